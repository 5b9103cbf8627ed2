import { z } from "zod";
import { PLAN_ORDER, planLimits } from "@/lib/billing/plans";
import { predictPool } from "@/lib/editions/predict-pool";
import { loadEditionPredictor } from "@/lib/editions/predictor";
import { AppError } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { batchNotice } from "@/lib/lookup/batch";
import { resultsCsvHeader } from "@/lib/lookup/results-csv";
import { describeRowErrors, parseSitesCsv } from "@/lib/lookup/sites-csv";

// The batch page's upload: the sites file as text, checked whole (row errors by
// line, nothing computed), then the results streamed as NDJSON —
//   {"type":"start","total":N,"edition":…,"header":"…csv header…"}
//   {"type":"rows","done":k,"csv":"…rows…"}   (every CHUNK sites, so the page can show progress)
//   {"type":"end","done":N}
// The plan's batch size is the limit (lib/billing/plans batchLookupMaxSites). The rows are
// computed on the prediction worker threads (lib/editions/predict-pool.ts), a few chunks ahead
// of what has been sent, so the request thread stays free for other requests.

const CHUNK = 500;
/** Chunks asked for ahead of the one being sent. */
const AHEAD = 4;

const input = z.strictObject({
  csv: z.string({ error: "Choose a CSV file of sites." }).min(1, { error: "The file is empty." }).max(3_000_000, { error: "The file is larger than 3 MB." }),
  fileName: z.string().max(300).optional(),
  edition: z
    .string()
    .regex(/^(?:|current|[0-9A-Za-z][0-9A-Za-z._-]{0,39})$/, { error: "An edition id looks like 2026.12.1." })
    .optional(),
});

const BATCH_PLANS = PLAN_ORDER.filter((p) => planLimits(p).batchLookupMaxSites > 0);

export const POST = route({ auth: { plans: BATCH_PLANS }, body: input, maxBodyBytes: 3_200_000 }, async ({ viewer, body }) => {
  const max = planLimits(viewer.plan).batchLookupMaxSites;
  const { sites, errors } = parseSitesCsv(body.csv, { maxSites: max });
  if (errors.length) {
    const lines = describeRowErrors(errors);
    throw new AppError("invalid-input", { detail: `The file has ${errors.length} problem${errors.length === 1 ? "" : "s"}; nothing was looked up. Fix them and upload it again.`, fields: { csv: lines } });
  }
  const predictor = await loadEditionPredictor(body.edition || undefined);
  const enc = new TextEncoder();
  const line = (o: unknown) => enc.encode(`${JSON.stringify(o)}\n`);
  const pool = predictPool();
  const asked: Promise<string>[] = [];
  let next = 0;
  let cancelled = false;
  const askAhead = () => {
    while (!cancelled && next < sites.length && asked.length < AHEAD) {
      const part = sites.slice(next, next + CHUNK);
      const rows = pool.csvRows(
        predictor,
        part.map((s) => ({ lat: s.lat, lon: s.lon, elevationM: s.elevationM })),
        part.map((s) => s.id),
        next === 0 ? batchNotice(predictor.edition) : undefined,
      );
      rows.catch(() => {}); // awaited in order by pull(); avoid an unhandled rejection meanwhile
      asked.push(rows);
      next += part.length;
    }
  };
  let done = 0;
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(line({ type: "start", total: sites.length, edition: predictor.editionId, header: resultsCsvHeader() }));
    },
    async pull(controller) {
      if (done >= sites.length) {
        controller.enqueue(line({ type: "end", done }));
        controller.close();
        return;
      }
      askAhead();
      const csv = await asked.shift()!;
      done = Math.min(sites.length, done + CHUNK);
      controller.enqueue(line({ type: "rows", done, csv }));
      askAhead();
    },
    cancel() {
      cancelled = true; // the page went away: ask for no more chunks
    },
  });
  return new Response(stream, { headers: { "Content-Type": "application/x-ndjson; charset=utf-8", "Cache-Control": "no-store" } });
});
