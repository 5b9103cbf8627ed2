import type { Metadata, Viewport } from "next";
import { BillingBanner, type BannerData } from "@/components/billing/billing-banner";
import { longDate } from "@/components/billing/format";
import { SiteFooter } from "@/components/shell/site-footer";
import { SiteHeader } from "@/components/shell/site-header";
import { getViewer, type Viewer } from "@/lib/auth/guard";
import { billingBannerFor } from "@/lib/billing/overview";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import "./globals.css";
import { plexGreek, plexMono, plexSans } from "./fonts";

export const metadata: Metadata = {
  title: { default: "Rainprint", template: "%s · Rainprint" },
  description:
    "Quality-checked precipitation isotope data (δ18O, δ2H, d-excess) and versioned, kriged isoscapes with honest uncertainty.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

/** The site-wide billing notice (a failed payment in its grace period, or a plan paused after it) for this viewer. */
async function bannerFor(viewer: Viewer | null): Promise<BannerData> {
  if (!viewer) return null;
  const b = await billingBannerFor(viewer.id);
  if (!b || b.kind === "ending") return null;
  const org = b.organizationId ? viewer.organizations.find((o) => o.id === b.organizationId) : undefined;
  return {
    kind: b.kind,
    planName: PLAN_CATALOGUE[b.plan].name,
    date: longDate(b.kind === "payment-failed" ? b.graceUntil : b.since),
    organization: org ? { name: org.name, isOwner: org.role === "owner" } : null,
  };
}

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  const viewer = await getViewer();
  const banner = await bannerFor(viewer);
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
        <BillingBanner banner={banner} />
        <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-8">
          {children}
        </main>
        <SiteFooter />
      </body>
    </html>
  );
}
