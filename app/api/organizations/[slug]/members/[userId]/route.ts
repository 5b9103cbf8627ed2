import { removeMember } from "@/lib/organizations";
import { route } from "@/lib/http/route";

/** Remove a member (owners only). They lose the organisation's plan on their next request. */
export const DELETE = route({ auth: {} }, async ({ viewer, params }) => {
  await removeMember(viewer, String(params.slug), String(params.userId));
  return Response.json({ message: "The member was removed and no longer has the organisation's plan." }, { headers: { "Cache-Control": "no-store" } });
});
