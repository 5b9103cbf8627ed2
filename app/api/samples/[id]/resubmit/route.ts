import { route } from "@/lib/http/route";
import { resubmitSample } from "@/lib/intake/batches";
import { resubmitInput } from "@/lib/intake/schemas";

// POST: correct a sample that was returned (its contributor only; others 404).
export const POST = route({ auth: {}, body: resubmitInput }, async ({ viewer, body, params }) => {
  const r = await resubmitSample(viewer, String(params.id), body);
  return Response.json({ ...r, message: "The corrected sample is in the review queue; the earlier version is kept in the history." }, { status: 201 });
});
