import { emailOnlyInput, resendVerification } from "@/lib/auth/accounts";
import { NEUTRAL_MAIL_SENT } from "@/lib/auth/messages";
import { accepted, route } from "@/lib/http/route";

export const POST = route({ auth: "public", body: emailOnlyInput }, async ({ body }) => {
  await resendVerification(body.email);
  return accepted(NEUTRAL_MAIL_SENT);
});
