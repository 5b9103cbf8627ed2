import { layout, type RenderedMail } from "./layout";

export type MagicLinkData = { url: string; expiresMinutes: number; appUrl: string };

export function magicLink(d: MagicLinkData): RenderedMail {
  return layout({
    subject: "Your Rainprint sign-in link",
    heading: "Sign in to Rainprint",
    preheader: "A one-time link to sign in without your password.",
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: "Use the button below to sign in. You do not need your password." },
      { kind: "button", label: "Sign in to Rainprint", url: d.url },
      { kind: "small", text: `The link works once and expires in ${d.expiresMinutes} minutes.` },
      { kind: "small", text: "If you did not ask for it, ignore this message; your account stays as it is." },
    ],
  });
}
