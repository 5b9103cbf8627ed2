import { layout, type RenderedMail } from "./layout";

// Sent instead of a confirmation link when someone signs up with an address
// that already has an account: the person at the address learns it, the
// person at the form does not.
export type AccountExistsData = { signInUrl: string; resetUrl: string; appUrl: string };

export function accountExists(d: AccountExistsData): RenderedMail {
  return layout({
    subject: "You already have a Rainprint account",
    heading: "You already have an account",
    preheader: "Someone tried to create a new account with this address.",
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: "Someone — probably you — tried to create a Rainprint account with this e-mail address, but an account with it already exists." },
      { kind: "button", label: "Sign in", url: d.signInUrl },
      { kind: "p", text: "Forgot your password? You can choose a new one:" },
      { kind: "button", label: "Choose a new password", url: d.resetUrl },
      { kind: "small", text: "If this was not you, ignore this message; your account has not changed." },
    ],
  });
}
