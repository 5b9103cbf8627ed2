import { verifyEmail, verifyInput } from "@/lib/auth/accounts";
import { route } from "@/lib/http/route";

/** Confirm an e-mail address from the one-time link. */
export const POST = route({ auth: "public", body: verifyInput }, async ({ body }) => {
  await verifyEmail(body.token);
  return Response.json({ message: "Your e-mail address is confirmed. You can sign in now." });
});
