"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useMutation } from "@tanstack/react-query";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useForm } from "react-hook-form";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import { COLLECTOR_TYPE_LABELS, SAMPLING_INTERVAL_LABELS, stationInput, type StationFormValues, type StationInput } from "@/lib/intake/schemas";
import type { StationCheck } from "@/lib/intake/station-checks";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { QueryProvider } from "./query-provider";

// Register a station: react-hook-form with the same zod schema the route handler uses.

type Created = { station: { code: string }; checks: StationCheck[]; message: string };

/** Registration, or (with `edit`) the owner's correction of a station returned for changes. */
export function StationForm({ edit }: { edit?: { code: string; rowVersion: number; values: StationFormValues } }) {
  return (
    <QueryProvider>
      <StationFormInner edit={edit} />
    </QueryProvider>
  );
}

const input = "rounded border border-ink-300 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-severity-fail";

function StationFormInner({ edit }: { edit?: { code: string; rowVersion: number; values: StationFormValues } }) {
  const router = useRouter();
  const form = useForm<StationFormValues, unknown, StationInput>({
    resolver: zodResolver(stationInput),
    defaultValues: edit?.values ?? { code: "", name: "", lat: "", lon: "", elevationM: "", collectorType: "bulk-oil", samplingInterval: "monthly", operatingOrg: "", startDate: "", notes: "" } as unknown as StationFormValues,
  });
  const save = useMutation({
    mutationFn: async (values: StationInput) => {
      const r = edit
        ? await sendJson<Created>(`/api/stations/${encodeURIComponent(edit.code)}`, { ...values, rowVersion: edit.rowVersion }, "PATCH")
        : await sendJson<Created>("/api/stations", values);
      if (!r.ok) {
        for (const [k, msgs] of Object.entries(r.problem.errors ?? {})) form.setError(k as keyof StationFormValues, { message: msgs.join(" ") });
        throw new Error(problemMessage(r.problem));
      }
      return r.data;
    },
  });
  const err = (k: keyof StationFormValues) => form.formState.errors[k]?.message as string | undefined;
  const field = (k: keyof StationFormValues, label: string, hint?: string, props: Record<string, unknown> = {}) => (
    <div className="flex flex-col gap-1">
      <label htmlFor={`st-${k}`} className="text-sm font-medium">{label}</label>
      {hint ? <p className="text-xs text-ink-600">{hint}</p> : null}
      <input id={`st-${k}`} className={input} aria-invalid={err(k) ? true : undefined} {...form.register(k)} {...props} />
      {err(k) ? <p className="text-sm text-severity-fail">{err(k)}</p> : null}
    </div>
  );

  if (save.data && edit) {
    return (
      <div className="flex flex-col gap-3" data-testid="station-corrected">
        <Alert tone="success" title={save.data.message} />
        <p>
          <button type="button" className="underline" onClick={() => router.refresh()}>Show the station</button>
        </p>
      </div>
    );
  }
  if (save.data) {
    return (
      <div className="flex flex-col gap-3" data-testid="station-registered">
        <Alert tone="success" title={save.data.message} />
        {save.data.checks.length ? (
          <Alert tone="warn" title="The entry checks found something worth a second look">
            <ul className="list-disc pl-5">
              {save.data.checks.map((c, i) => <li key={i}>{c.message}</li>)}
            </ul>
          </Alert>
        ) : null}
        <p>
          <Link className="underline" href={`/contribute/stations/${encodeURIComponent(save.data.station.code)}`}>Open the station</Link> ·{" "}
          <Link className="underline" href="/contribute">Back to your dashboard</Link>
        </p>
      </div>
    );
  }
  return (
    <form noValidate className="grid max-w-3xl grid-cols-1 gap-4 sm:grid-cols-2" onSubmit={form.handleSubmit((v) => save.mutate(v))}>
      {save.error ? <div className="sm:col-span-2"><Alert tone="error">{save.error.message}</Alert></div> : null}
      {field("code", "Station code", edit ? "The code cannot be changed." : "3–24 capital letters, digits and hyphens; it appears in your files.", edit ? { readOnly: true } : {})}
      {field("name", "Station name")}
      {field("lat", "Latitude (°)", "Decimal degrees, north positive, e.g. 47.37.", { inputMode: "decimal" })}
      {field("lon", "Longitude (°)", "Decimal degrees, east positive, e.g. 8.54.", { inputMode: "decimal" })}
      {field("elevationM", "Elevation (m above sea level)", undefined, { inputMode: "decimal" })}
      <div className="flex flex-col gap-1">
        <label htmlFor="st-collectorType" className="text-sm font-medium">Collector type</label>
        <select id="st-collectorType" className={input} {...form.register("collectorType")}>
          {Object.entries(COLLECTOR_TYPE_LABELS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
        </select>
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="st-samplingInterval" className="text-sm font-medium">Sampling interval</label>
        <select id="st-samplingInterval" className={input} {...form.register("samplingInterval")}>
          {Object.entries(SAMPLING_INTERVAL_LABELS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
        </select>
      </div>
      {field("operatingOrg", "Operating organisation")}
      {field("startDate", "Sampling started (YYYY-MM-DD)", undefined, { placeholder: "2024-01-01" })}
      <div className="flex flex-col gap-1 sm:col-span-2">
        <label htmlFor="st-notes" className="text-sm font-medium">Notes</label>
        <textarea id="st-notes" rows={3} className={input} {...form.register("notes")} />
      </div>
      <div className="sm:col-span-2">
        <Button type="submit" disabled={save.isPending}>{edit ? "Send the corrected station" : "Register station"}</Button>
      </div>
    </form>
  );
}
