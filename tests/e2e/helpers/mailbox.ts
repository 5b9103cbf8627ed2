import { inject } from "vitest";

// Reading the local mail stand-in (what the app "sent") from tests.

export type Mail = { id: string; to: string[]; from: string; subject: string; html: string | null; text: string | null; created_at: string };

export async function listMail(to: string): Promise<Mail[]> {
  const res = await fetch(`${inject("mailUrl")}/_standin/messages?to=${encodeURIComponent(to)}`);
  if (!res.ok) throw new Error(`mail stand-in answered ${res.status}`);
  return ((await res.json()) as { data: Mail[] }).data;
}

/** Wait for a message to `to` (optionally whose subject matches) that is not in `seen`; newest first. */
export async function waitForMail(to: string, opts: { subject?: RegExp; timeoutMs?: number; seen?: string[] } = {}): Promise<Mail> {
  const deadline = Date.now() + (opts.timeoutMs ?? 20_000);
  for (;;) {
    const found = (await listMail(to)).find((m) => (!opts.subject || opts.subject.test(m.subject)) && !opts.seen?.includes(m.id));
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no e-mail to ${to}${opts.subject ? ` matching ${opts.subject}` : ""} arrived`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The first link in the message's text part whose path starts with `pathPrefix`. */
export function linkIn(mail: Mail, pathPrefix: string): string {
  const urls = (mail.text ?? "").match(/https?:\/\/\S+/g) ?? [];
  const hit = urls.find((u) => new URL(u).pathname.startsWith(pathPrefix));
  if (!hit) throw new Error(`no ${pathPrefix} link in "${mail.subject}"`);
  return hit;
}
