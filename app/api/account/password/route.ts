import { changePassword, changePasswordInput } from "@/lib/auth/accounts";
import { route } from "@/lib/http/route";

export const POST = route({ auth: {}, body: changePasswordInput }, async ({ viewer, body }) => {
  await changePassword(viewer.id, body);
  return Response.json({ message: "Your password has been changed." });
});
