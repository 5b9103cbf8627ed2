import { route } from "@/lib/http/route";
import { publishReadyEdition } from "@/lib/editions/lifecycle";

/** Publish a ready edition in one transaction (moderators and admins); it becomes the current edition. */
export const POST = route({ auth: { roles: ["moderator", "admin"] } }, async ({ viewer, params }) => {
  await publishReadyEdition(String(params.id), viewer.id);
  return Response.json({ status: "published" });
});
