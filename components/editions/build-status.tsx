"use client";

import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { problemMessage, sendJson } from "@/lib/client-fetch";

type Job = { status: string; progress: number; stage: string | null; error: string | null; attempts: number; maxAttempts: number } | null;
type Status = { id: string; status: string; job: Job };

/**
 * One build: a progress bar with the current stage while it runs (polled every second), and the
 * action that fits its state — cancel a running build, resume a failed or cancelled one, publish a ready one.
 */
export function BuildStatus({ initial }: { initial: Status }) {
  const router = useRouter();
  const [s, setS] = useState<Status>(initial);
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);

  useEffect(() => {
    if (s.status !== "building") return;
    let stop = false;
    const t = setInterval(async () => {
      const r = await fetch(`/api/editions/${encodeURIComponent(s.id)}/status`, { cache: "no-store" });
      if (!r.ok || stop) return;
      const next = (await r.json()) as Status;
      setS(next);
      if (next.status !== "building") router.refresh();
    }, 1000);
    return () => {
      stop = true;
      clearInterval(t);
    };
  }, [s.id, s.status, router]);

  async function act(action: "cancel" | "resume" | "publish") {
    setPending(true);
    setError(null);
    const r = await sendJson(`/api/editions/${encodeURIComponent(s.id)}/${action}`, {});
    setPending(false);
    if (!r.ok) {
      setError(problemMessage(r.problem));
      return;
    }
    setS({ ...s, status: action === "cancel" ? "cancelled" : action === "resume" ? "building" : "published", job: action === "resume" ? null : s.job });
    router.refresh();
  }

  const pct = Math.round((s.job?.progress ?? 0) * 100);
  return (
    <div className="flex flex-col gap-2" data-testid={`build-${s.id}`} data-status={s.status}>
      <p className="text-sm">
        <span className="font-medium">State:</span> <span data-testid="build-state">{STATE_TEXT[s.status] ?? s.status}</span>
      </p>
      {s.status === "building" ? (
        <div>
          <progress className="h-3 w-full max-w-md accent-tarn-600" max={100} value={pct} aria-label={`Build of edition ${s.id}`} aria-valuetext={`${pct} %, ${s.job?.stage ?? "waiting for the worker"}`} />
          <p className="text-sm text-ink-700" role="status" aria-live="polite" data-testid="build-stage">
            {pct} % — {s.job?.stage ?? (s.job?.status === "queued" ? "waiting for the worker" : "starting")}
            {s.job && s.job.attempts > 1 ? ` (attempt ${s.job.attempts} of ${s.job.maxAttempts}, resumed)` : ""}
          </p>
        </div>
      ) : null}
      {s.status === "failed" && s.job?.error ? <p className="text-sm text-severity-fail">Last error: {s.job.error}</p> : null}
      {error ? <Alert tone="error">{error}</Alert> : null}
      <div className="flex gap-2">
        {s.status === "building" ? (
          <Button kind="secondary" disabled={pending} onClick={() => act("cancel")}>
            Cancel build
          </Button>
        ) : null}
        {s.status === "failed" || s.status === "cancelled" ? (
          <Button kind="secondary" disabled={pending} onClick={() => act("resume")}>
            Resume build
          </Button>
        ) : null}
        {s.status === "ready" ? (
          <Button disabled={pending} onClick={() => act("publish")}>
            Publish edition {s.id}
          </Button>
        ) : null}
      </div>
    </div>
  );
}

const STATE_TEXT: Record<string, string> = {
  building: "building",
  ready: "ready to publish",
  failed: "failed — the current edition is unchanged",
  cancelled: "cancelled — the current edition is unchanged",
  published: "published",
  withdrawn: "withdrawn",
};
