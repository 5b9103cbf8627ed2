import { updateUser, updateUserInput } from "@/lib/admin/users";
import { route } from "@/lib/http/route";

/** Change a user's role or disabled state (admins only); every change is audited. */
export const PATCH = route({ auth: { roles: ["admin"] }, body: updateUserInput }, async ({ viewer, body, params }) => {
  const user = await updateUser(viewer, String(params.id), body);
  return Response.json(user);
});
