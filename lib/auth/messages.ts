// Sign-in outcome codes and the words shown for them. Client-safe (no server
// imports): the sign-in page maps the `error` code next-auth returns to these.
// None of them says whether an account exists.

export const SIGN_IN_ERRORS = {
  invalid: "That e-mail and password were not accepted. Check both and try again. If you signed up recently, confirm your e-mail address first — we can send the confirmation link again.",
  throttled: "Too many unsuccessful attempts. Wait 15 minutes, or choose a new password with the link below.",
  Verification: "That sign-in link has expired or was already used. Ask for a new one below.",
  AccessDenied: "Signing in with that link was not possible. Ask for a new link or sign in with your password.",
  EmailSignin: "We could not send the sign-in link just now. Please try again in a minute.",
  SessionRequired: "Sign in to continue.",
  default: "Signing in did not work. Please try again.",
} as const;

export type SignInErrorCode = keyof typeof SIGN_IN_ERRORS;

export function signInErrorMessage(code: string | null | undefined): string | null {
  if (!code) return null;
  if (code === "CredentialsSignin") return SIGN_IN_ERRORS.invalid;
  return (SIGN_IN_ERRORS as Record<string, string>)[code] ?? SIGN_IN_ERRORS.default;
}

/** The neutral answer to sign-up, magic-link, reset and resend requests, whatever the address. */
export const NEUTRAL_MAIL_SENT =
  "If this address can be used, we have sent an e-mail to it. Open the link in that e-mail to continue; it may take a minute to arrive.";
