import { revokeInvitation } from "@/lib/organizations";
import { route } from "@/lib/http/route";

/** Withdraw a pending invitation (owners only). */
export const DELETE = route({ auth: {} }, async ({ viewer, params }) => {
  await revokeInvitation(viewer, String(params.slug), String(params.id));
  return Response.json({ message: "The invitation was withdrawn; its link no longer works." }, { headers: { "Cache-Control": "no-store" } });
});
