import { route } from "@/lib/http/route";
import { decideSamples } from "@/lib/intake/review";
import { acceptCleanInput } from "@/lib/intake/schemas";

// POST: accept the listed samples of this batch in one go — only those without a warning or failure (moderators).
export const POST = route({ auth: { roles: ["moderator", "admin"] }, body: acceptCleanInput, maxBodyBytes: 1024 * 1024 }, async ({ viewer, body, params }) => {
  const r = await decideSamples(viewer, { decision: "accept", reason: "Accepted in bulk: the checks found no warning or failure.", samples: body.samples }, { onlyBatchId: String(params.id), requireClean: true });
  return Response.json({ ...r, message: `${r.decided} clean sample${r.decided === 1 ? "" : "s"} accepted.` });
});
