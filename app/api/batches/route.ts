import { route } from "@/lib/http/route";
import { batchSummaries, rowsFromForm, submitBatch } from "@/lib/intake/batches";
import { INTAKE_LIMITS } from "@/lib/intake/columns";
import { submitBatchInput } from "@/lib/intake/schemas";
import { errors } from "@/lib/errors";

// GET: the viewer's batches. POST: submit a batch (rows, and the file they came from).
export const GET = route({ auth: {} }, async ({ viewer }) => {
  return Response.json({ batches: await batchSummaries({ contributorId: viewer.id }) });
});

export const POST = route(
  { auth: {}, body: submitBatchInput, maxBodyBytes: Math.ceil((INTAKE_LIMITS.maxFileBytes * 4) / 3) * 2 + 256 * 1024 },
  async ({ viewer, body }) => {
    let file: { name: string; bytes: Uint8Array } | null = null;
    if (body.file) {
      const bytes = new Uint8Array(Buffer.from(body.file.contentBase64, "base64"));
      if (bytes.byteLength > INTAKE_LIMITS.maxFileBytes) throw errors.invalid("The file is larger than the upload limit. Nothing was saved.");
      file = { name: body.file.name, bytes };
    }
    const r = await submitBatch(viewer, { rows: rowsFromForm(body.rows), file, note: body.note ?? null, source: file ? "csv" : "form" });
    return Response.json(
      { batchId: r.batchId, sampleCount: r.sampleCount, worstSeverity: r.worst, message: `Batch submitted: ${r.sampleCount} samples are in the review queue.` },
      { status: 201 },
    );
  },
);
