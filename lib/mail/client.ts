import "server-only";
import { Resend } from "resend";
import { env } from "@/lib/env";

// The Resend SDK client, created on first use (the constructor throws without
// a key). With RESEND_BASE_URL set it talks to the local stand-in
// (scripts/standins/mail.ts); unset, it talks to Resend itself.
let client: Resend | undefined;

export function mailClient(): Resend {
  if (!client) {
    const e = env();
    client = new Resend(e.RESEND_API_KEY, { baseUrl: e.RESEND_BASE_URL?.replace(/\/+$/, "") });
  }
  return client;
}

/** True while the local stand-in is configured (the /dev/mailbox page exists only then). */
export function usingMailStandin(): boolean {
  return Boolean(env().RESEND_BASE_URL);
}
