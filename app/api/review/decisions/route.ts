import { route } from "@/lib/http/route";
import { decideSamples } from "@/lib/intake/review";
import { sampleDecisionInput } from "@/lib/intake/schemas";

// POST: accept, reject or return samples with a reason (moderators). 409 when another decision got there first.
export const POST = route({ auth: { roles: ["moderator", "admin"] }, body: sampleDecisionInput, maxBodyBytes: 1024 * 1024 }, async ({ viewer, body }) => {
  const r = await decideSamples(viewer, body);
  return Response.json({ ...r, message: `${r.decided} sample${r.decided === 1 ? "" : "s"} ${r.status}.` });
});
