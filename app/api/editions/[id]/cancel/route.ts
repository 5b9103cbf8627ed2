import { route } from "@/lib/http/route";
import { cancelEditionBuild } from "@/lib/editions/lifecycle";

/** Cancel an edition build in progress (moderators and admins); the published edition stays as it is. */
export const POST = route({ auth: { roles: ["moderator", "admin"] } }, async ({ viewer, params }) => {
  await cancelEditionBuild(String(params.id), viewer.id);
  return Response.json({ status: "cancelled" });
});
