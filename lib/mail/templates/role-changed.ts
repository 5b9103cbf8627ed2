import { layout, type RenderedMail } from "./layout";

export type RoleChangedData = { name: string | null; from: string; to: string; reason: string | null; appUrl: string };

const ROLE_WORDS: Record<string, string> = {
  contributor: "contributor (register stations, submit sample batches)",
  moderator: "moderator (review desk, editions)",
  admin: "administrator (users, roles, plans, jobs)",
};

export function roleChanged(d: RoleChangedData): RenderedMail {
  return layout({
    subject: `Your Rainprint role is now ${d.to}`,
    heading: "Your role has changed",
    preheader: `An administrator changed your role from ${d.from} to ${d.to}.`,
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," },
      { kind: "p", text: `An administrator changed your Rainprint role from ${ROLE_WORDS[d.from] ?? d.from} to ${ROLE_WORDS[d.to] ?? d.to}.` },
      ...(d.reason ? [{ kind: "p" as const, text: `Reason given: ${d.reason}` }] : []),
      { kind: "button", label: "Open your account", url: `${d.appUrl}/account` },
      { kind: "small", text: "If you think this is a mistake, reply to your administrator." },
    ],
  });
}
