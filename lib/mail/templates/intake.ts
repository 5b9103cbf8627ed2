import { layout, type Block, type RenderedMail } from "./layout";

// Intake notices: a batch received, a batch decided (with the reasons), a station decided,
// and the moderators' daily digest of the review desk.

export type BatchReceivedData = { name: string | null; batchId: string; sampleCount: number; worstSeverity: string | null; stationCodes: string[]; appUrl: string };

export function batchReceived(d: BatchReceivedData): RenderedMail {
  const url = `${d.appUrl}/contribute/batches/${d.batchId}`;
  const checks =
    d.worstSeverity === "fail"
      ? "Some samples failed a check; a moderator will look at them, and you can see why on the batch page."
      : d.worstSeverity === "warn"
        ? "Some samples have warnings from the checks; the batch page explains each one."
        : "The automatic checks found nothing serious.";
  return layout({
    subject: `Batch received: ${d.sampleCount} sample${d.sampleCount === 1 ? "" : "s"} (${d.stationCodes.join(", ")})`,
    heading: "Your batch is in the review queue",
    preheader: `${d.sampleCount} samples from ${d.stationCodes.join(", ")} are waiting for a moderator.`,
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      { kind: "p", text: `Rainprint received your batch of ${d.sampleCount} sample${d.sampleCount === 1 ? "" : "s"} for ${d.stationCodes.join(", ")}. It is queued for review.` },
      { kind: "p", text: checks },
      { kind: "button", label: "Open the batch", url },
      { kind: "small", text: "You will get another e-mail when a moderator has decided every sample." },
    ],
  });
}

export type DecidedSample = { stationCode: string; startDate: string; endDate: string; decision: string; reason: string | null };

export type BatchDecidedData = { name: string | null; batchId: string; accepted: number; rejected: number; returned: number; samples: DecidedSample[]; appUrl: string };

export function batchDecided(d: BatchDecidedData): RenderedMail {
  const url = `${d.appUrl}/contribute/batches/${d.batchId}`;
  const notAccepted = d.samples.filter((s) => s.decision !== "accepted");
  const blocks: Block[] = [
    { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
    {
      kind: "p",
      text: `A moderator has decided every sample of your batch: ${d.accepted} accepted, ${d.returned} returned for correction, ${d.rejected} rejected.`,
    },
  ];
  for (const s of notAccepted.slice(0, 50)) {
    blocks.push({
      kind: "p",
      text: `${s.stationCode}, ${s.startDate} to ${s.endDate}: ${s.decision === "returned" ? "returned for correction" : "rejected"}. Reason: ${s.reason ?? "none given"}`,
    });
  }
  if (notAccepted.length > 50) blocks.push({ kind: "small", text: `… and ${notAccepted.length - 50} more on the batch page.` });
  if (d.returned) blocks.push({ kind: "p", text: "Returned samples can be corrected and sent again from the batch page; the earlier version stays in the history." });
  blocks.push({ kind: "button", label: "Open the batch", url });
  return layout({
    subject: `Batch decided: ${d.accepted} accepted, ${d.returned} returned, ${d.rejected} rejected`,
    heading: "Your batch has been reviewed",
    preheader: `${d.accepted} accepted, ${d.returned} returned for correction, ${d.rejected} rejected.`,
    appUrl: d.appUrl,
    blocks,
  });
}

export type StationDecidedData = { name: string | null; code: string; stationName: string; decision: "approve" | "return" | "reject"; reason: string | null; appUrl: string };

const STATION_WORDS = { approve: "approved", return: "returned for changes", reject: "rejected" } as const;

export function stationDecided(d: StationDecidedData): RenderedMail {
  const word = STATION_WORDS[d.decision];
  return layout({
    subject: `Station ${d.code} ${word}`,
    heading: `Station ${d.code} ${word}`,
    preheader: `A moderator ${word === "approved" ? "approved" : "looked at"} ${d.stationName} (${d.code}).`,
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      { kind: "p", text: `A moderator has ${word} your station ${d.stationName} (${d.code}).` },
      ...(d.reason ? [{ kind: "p" as const, text: `Reason: ${d.reason}` }] : []),
      ...(d.decision === "approve" ? [{ kind: "p" as const, text: "You can now submit sample batches for it." }] : []),
      { kind: "button", label: "Open the station", url: `${d.appUrl}/contribute/stations/${encodeURIComponent(d.code)}` },
    ],
  });
}

export type ReviewDigestData = {
  name: string | null;
  day: string;
  queuedBatches: number;
  pendingSamples: number;
  failSamples: number;
  warnSamples: number;
  oldestDays: number | null;
  pendingStations: number;
  appUrl: string;
};

export function reviewDigest(d: ReviewDigestData): RenderedMail {
  return layout({
    subject: `Review desk ${d.day}: ${d.queuedBatches} batches, ${d.pendingStations} stations waiting`,
    heading: "The review desk today",
    preheader: `${d.pendingSamples} samples in ${d.queuedBatches} batches and ${d.pendingStations} new stations are waiting.`,
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      {
        kind: "p",
        text: `Waiting for a decision: ${d.pendingSamples} samples in ${d.queuedBatches} batches (${d.failSamples} with a failed check, ${d.warnSamples} with warnings) and ${d.pendingStations} new stations.`,
      },
      ...(d.oldestDays !== null ? [{ kind: "p" as const, text: `The oldest batch has waited ${d.oldestDays} day${d.oldestDays === 1 ? "" : "s"}.` }] : []),
      { kind: "button", label: "Open the review desk", url: `${d.appUrl}/review` },
      { kind: "small", text: "Sent once a day to moderators while anything is waiting." },
    ],
  });
}
