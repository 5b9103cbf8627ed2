import { layout, type RenderedMail } from "./layout";

export type PasswordResetData = { name: string | null; url: string; expiresMinutes: number; appUrl: string };

export function passwordReset(d: PasswordResetData): RenderedMail {
  return layout({
    subject: "Choose a new Rainprint password",
    heading: "Choose a new password",
    preheader: "A one-time link to set a new password for your Rainprint account.",
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      { kind: "p", text: "We received a request to set a new password for the Rainprint account with this e-mail address." },
      { kind: "button", label: "Choose a new password", url: d.url },
      { kind: "small", text: `The link works once and expires in ${d.expiresMinutes} minutes. Your current password keeps working until you choose a new one.` },
      { kind: "small", text: "If you did not ask for this, ignore this message." },
    ],
  });
}
