import { route } from "@/lib/http/route";
import { readBodyLimited } from "@/lib/http/body";
import { previewCsv } from "@/lib/intake/batches";
import { INTAKE_LIMITS } from "@/lib/intake/columns";
import { errors } from "@/lib/errors";

// POST: the raw bytes of a sample file (any content type) → its rows with errors and check
// results. Writes nothing. Over the limit → 413 before the file is read in full.
export const POST = route({ auth: {} }, async ({ viewer, req }) => {
  const bytes = await readBodyLimited(req, INTAKE_LIMITS.maxFileBytes).catch((e) => {
    if (e && typeof e === "object" && "status" in e && e.status === 413)
      throw errors.invalid(`The file is larger than the ${INTAKE_LIMITS.maxFileBytes / (1024 * 1024)} MB an upload may be. Split it into several batches. Nothing was saved.`);
    throw e;
  });
  return Response.json(await previewCsv(viewer, bytes));
});
