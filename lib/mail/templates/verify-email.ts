import { layout, type RenderedMail } from "./layout";

export type VerifyEmailData = { name: string | null; url: string; expiresHours: number; appUrl: string };

export function verifyEmail(d: VerifyEmailData): RenderedMail {
  return layout({
    subject: "Confirm your e-mail address for Rainprint",
    heading: "Confirm your e-mail address",
    preheader: "One click to finish creating your Rainprint account.",
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      { kind: "p", text: "Someone — we hope you — created a Rainprint account with this e-mail address. Confirm the address to finish and to be able to sign in." },
      { kind: "button", label: "Confirm my e-mail address", url: d.url },
      { kind: "small", text: `The link works once and expires in ${d.expiresHours} hours.` },
      { kind: "small", text: "If you did not create an account, ignore this message: nothing happens unless the link is opened." },
    ],
  });
}
