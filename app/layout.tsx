import type { Metadata, Viewport } from "next";
import "./globals.css";
import { plexGreek, plexMono, plexSans } from "./fonts";

export const metadata: Metadata = {
  title: { default: "Rainprint", template: "%s · Rainprint" },
  description:
    "Quality-checked precipitation isotope data (δ18O, δ2H, d-excess) and versioned, kriged isoscapes with honest uncertainty.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${plexSans.variable} ${plexGreek.variable} ${plexMono.variable}`}>
      <body className="min-h-screen bg-paper font-sans text-ink-900 antialiased">{children}</body>
    </html>
  );
}
