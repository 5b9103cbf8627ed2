import "server-only";
import { env } from "@/lib/env";

// Reading the local mail stand-in's mailbox (for /dev/mailbox). Only while
// RESEND_BASE_URL points at a stand-in; null otherwise.

export type MailboxMessage = {
  id: string;
  from: string;
  to: string[];
  subject: string;
  html: string | null;
  text: string | null;
  created_at: string;
};

export async function readStandinMailbox(to?: string): Promise<MailboxMessage[] | null> {
  const base = env().RESEND_BASE_URL;
  if (!base) return null;
  const url = new URL("/_standin/messages", base);
  if (to) url.searchParams.set("to", to);
  const res = await fetch(url, { cache: "no-store", signal: AbortSignal.timeout(3000) });
  if (!res.ok) throw new Error(`The mail stand-in answered ${res.status}`);
  const body = (await res.json()) as { data: MailboxMessage[] };
  return body.data;
}
