import { route } from "@/lib/http/route";
import { prepareRows, publicPreview, rowsFromForm } from "@/lib/intake/batches";
import { sampleRowsInput } from "@/lib/intake/schemas";

// POST: rows typed into the form (or a file's rows after editing) → errors and check results. Writes nothing.
export const POST = route({ auth: {}, body: sampleRowsInput, maxBodyBytes: 8 * 1024 * 1024 }, async ({ viewer, body }) => {
  const p = await prepareRows(viewer, rowsFromForm(body.rows));
  return Response.json(publicPreview(p));
});
