import { route } from "@/lib/http/route";
import { batchForViewer } from "@/lib/intake/batches";
import { auditFor } from "@/lib/intake/stations";

// GET: a batch with its samples and audit trail — its contributor and moderators only (others 404).
export const GET = route({ auth: {} }, async ({ viewer, params }) => {
  const b = await batchForViewer(viewer, String(params.id));
  const audit = await auditFor([
    { type: "batch", ids: [b.batch.id] },
    { type: "sample", ids: b.samples.map((s) => s.id) },
  ]);
  return Response.json({ ...b, audit });
});
