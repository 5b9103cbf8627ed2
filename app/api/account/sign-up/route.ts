import { signUp, signUpInput } from "@/lib/auth/accounts";
import { NEUTRAL_MAIL_SENT } from "@/lib/auth/messages";
import { accepted, route } from "@/lib/http/route";

/** Create an account (or, for a known address, tell its owner by e-mail). Same answer either way. */
export const POST = route({ auth: "public", body: signUpInput }, async ({ body }) => {
  await signUp(body);
  return accepted(NEUTRAL_MAIL_SENT);
});
