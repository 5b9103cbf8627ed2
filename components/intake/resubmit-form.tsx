"use client";

import { useMutation } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useForm } from "react-hook-form";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import { SAMPLE_COLUMNS, type SampleColumnName } from "@/lib/intake/columns";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { QueryProvider } from "./query-provider";

// Correct a sample a moderator returned. The server validates with the shared schema and
// keeps the returned version in the history (superseded).

type Cells = Record<SampleColumnName, string>;

export function ResubmitForm(props: { sampleId: string; rowVersion: number; cells: Cells; label: string }) {
  return (
    <QueryProvider>
      <Inner {...props} />
    </QueryProvider>
  );
}

function Inner({ sampleId, rowVersion, cells, label }: { sampleId: string; rowVersion: number; cells: Cells; label: string }) {
  const router = useRouter();
  const form = useForm<Cells>({ defaultValues: cells });
  const save = useMutation({
    mutationFn: async (values: Cells) => {
      const r = await sendJson<{ message: string }>(`/api/samples/${sampleId}/resubmit`, { cells: values, rowVersion });
      if (!r.ok) {
        const rows = (r.problem as unknown as { rows?: { errors: { column: string; message: string }[] }[] }).rows;
        const detail = rows?.flatMap((x) => x.errors.map((e) => e.message)).join(" ");
        throw new Error([problemMessage(r.problem), detail].filter(Boolean).join(" "));
      }
      return r.data;
    },
    onSuccess: () => router.refresh(),
  });
  if (save.data) return <Alert tone="success">{save.data.message}</Alert>;
  return (
    <form className="flex flex-col gap-2" onSubmit={form.handleSubmit((v) => save.mutate(v))} aria-label={`Correct ${label}`}>
      {save.error ? <Alert tone="error">{save.error.message}</Alert> : null}
      <div className="flex flex-wrap gap-2">
        {SAMPLE_COLUMNS.filter((c) => c.name !== "station_code").map((c) => (
          <label key={c.name} className="flex flex-col text-xs">
            {c.label}
            <input className="w-32 rounded border border-ink-300 px-1 py-1 font-mono text-sm" {...form.register(c.name)} />
          </label>
        ))}
      </div>
      <div>
        <Button type="submit" disabled={save.isPending}>Send the corrected sample</Button>
      </div>
    </form>
  );
}
