import { layout, type RenderedMail } from "./layout";

export type SeatInvitationData = {
  organization: string;
  inviterName: string | null;
  url: string;
  expiresDays: number;
  appUrl: string;
};

export function seatInvitation(d: SeatInvitationData): RenderedMail {
  const who = d.inviterName ? `${d.inviterName} invites you` : "You are invited";
  return layout({
    subject: `Join ${d.organization} on Rainprint`,
    heading: `Join ${d.organization}`,
    preheader: `${who} to take a seat on ${d.organization}'s Institution plan.`,
    appUrl: d.appUrl,
    blocks: [
      { kind: "p", text: "Hello," },
      {
        kind: "p",
        text: `${who} to join ${d.organization} on Rainprint. As a member you take one of its Institution seats: downloads of station data and edition surfaces, batch site lookups and the organisation's API access.`,
      },
      { kind: "button", label: `Join ${d.organization}`, url: d.url },
      {
        kind: "p",
        text: "Sign in with this e-mail address to accept. If you have no Rainprint account yet, create one with this address first, then open this link again.",
      },
      { kind: "small", text: `The link works once and expires in ${d.expiresDays} days. The organisation's owner can withdraw it before then.` },
      { kind: "small", text: "If you did not expect this, ignore the message: nothing happens unless the link is opened and accepted." },
    ],
  });
}
