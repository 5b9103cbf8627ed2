import { profileInput, updateProfile } from "@/lib/auth/accounts";
import { route } from "@/lib/http/route";

export const PATCH = route({ auth: {}, body: profileInput }, async ({ viewer, body }) => {
  await updateProfile(viewer.id, body);
  return Response.json({ message: "Your profile has been saved." });
});
