import { emailOnlyInput, requestPasswordReset } from "@/lib/auth/accounts";
import { NEUTRAL_MAIL_SENT } from "@/lib/auth/messages";
import { accepted, route } from "@/lib/http/route";

/** Ask for a reset link. Same answer whether or not the address has an account. */
export const POST = route({ auth: "public", body: emailOnlyInput }, async ({ body }) => {
  await requestPasswordReset(body.email);
  return accepted(NEUTRAL_MAIL_SENT);
});
