import type { Metadata, Viewport } from "next";
import { SiteFooter } from "@/components/shell/site-footer";
import { SiteHeader } from "@/components/shell/site-header";
import { getViewer } from "@/lib/auth/guard";
import "./globals.css";
import { plexGreek, plexMono, plexSans } from "./fonts";

export const metadata: Metadata = {
  title: { default: "Rainprint", template: "%s · Rainprint" },
  description:
    "Quality-checked precipitation isotope data (δ18O, δ2H, d-excess) and versioned, kriged isoscapes with honest uncertainty.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  const viewer = await getViewer();
  return (
    <html lang="en" className={`${plexSans.variable} ${plexGreek.variable} ${plexMono.variable}`}>
      <body className="flex min-h-screen flex-col bg-paper font-sans text-ink-900 antialiased">
        <a
          href="#main"
          className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:px-3 focus:py-2 focus:text-ink-900 focus:shadow"
        >
          Skip to main content
        </a>
        <SiteHeader viewer={viewer ? { name: viewer.name, email: viewer.email, role: viewer.role, plan: viewer.plan } : null} />
        <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-8">
          {children}
        </main>
        <SiteFooter />
      </body>
    </html>
  );
}
