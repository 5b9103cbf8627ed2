"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { problemMessage, sendJson, type ClientProblem } from "@/lib/client-fetch";

/** Upload a GeoTIFF elevation model (sent as the raw request body). */
export function ElevationUpload() {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ tone: "error" | "success"; text: string } | null>(null);
  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const file = f.get("file");
    const name = String(f.get("name") ?? "");
    if (!(file instanceof File) || file.size === 0) {
      setMessage({ tone: "error", text: "Choose a GeoTIFF file." });
      return;
    }
    setPending(true);
    setMessage(null);
    const r = await fetch(`/api/admin/elevation?name=${encodeURIComponent(name)}`, { method: "POST", headers: { "content-type": "image/tiff" }, body: file });
    setPending(false);
    if (!r.ok) {
      const p = (await r.json().catch(() => ({ detail: `Upload failed (${r.status}).` }))) as ClientProblem;
      setMessage({ tone: "error", text: problemMessage(p) });
      return;
    }
    const d = (await r.json()) as { cells: number };
    setMessage({ tone: "success", text: `Uploaded: ${d.cells.toLocaleString("en-GB")} cells with an elevation. New builds will use it.` });
    router.refresh();
  }
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-3" aria-label="Upload an elevation model">
      <label className="flex flex-col gap-1 text-sm font-medium">
        Name
        <input name="name" required maxLength={120} className="rounded border border-ink-300 bg-white px-3 py-2 text-base font-normal" />
      </label>
      <label className="flex flex-col gap-1 text-sm font-medium">
        GeoTIFF file (one band, metres, WGS84 longitude/latitude; at most 64 MB)
        <input name="file" type="file" accept=".tif,.tiff,image/tiff" required className="text-sm font-normal" />
      </label>
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <div>
        <Button type="submit" disabled={pending}>
          {pending ? "Uploading …" : "Upload"}
        </Button>
      </div>
    </form>
  );
}

/** Turn a stored model on or off. */
export function ElevationToggle({ id, active }: { id: string; active: boolean }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  return (
    <span className="inline-flex items-center gap-2">
      <Button
        kind="secondary"
        onClick={async () => {
          const r = await sendJson(`/api/admin/elevation/${encodeURIComponent(id)}`, { active: !active }, "PATCH");
          if (!r.ok) setError(problemMessage(r.problem));
          else router.refresh();
        }}
      >
        {active ? "Stop using" : "Use for new builds"}
      </Button>
      {error ? <span className="text-sm text-severity-fail">{error}</span> : null}
    </span>
  );
}
