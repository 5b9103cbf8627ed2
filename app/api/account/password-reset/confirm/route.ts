import { resetInput, resetPassword } from "@/lib/auth/accounts";
import { route } from "@/lib/http/route";

/** Set a new password with a one-time reset link. */
export const POST = route({ auth: "public", body: resetInput }, async ({ body }) => {
  await resetPassword(body);
  return Response.json({ message: "Your new password is saved. Sign in with it now." });
});
