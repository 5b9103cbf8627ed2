import type { Metadata } from "next";
import { ReviewDesk } from "@/components/intake/review-queue";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { queueStats } from "@/lib/intake/review";

export const metadata: Metadata = { title: "Review desk" };

export default async function ReviewPage() {
  await requirePageViewer({ roles: ["moderator", "admin"], path: "/review" });
  const s = await queueStats();
  return (
    <div>
      <PageHeader
        title="Review desk"
        lead={`${s.pendingSamples} samples in ${s.queuedBatches} batches (${s.failSamples} fail a check, ${s.warnSamples} with warnings) and ${s.pendingStations} new stations are waiting. Every decision is recorded with your name and reason.`}
      />
      <ReviewDesk />
    </div>
  );
}
