import "server-only";
import { eq } from "drizzle-orm";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { mailLog } from "@/db/schema";
import { env } from "@/lib/env";
import { enqueueJob } from "@/lib/jobs";
import { mailClient } from "./client";
import { renderTemplate, type TemplateData, type TemplateName } from "./templates";

// Outgoing e-mail. `queueMail` renders a template, writes a mail_log row and
// enqueues a `send-email` job in one transaction (or inside the caller's), so
// a message is recorded exactly when the change that caused it is. The worker
// delivers it within about a second (it polls every 500 ms).

export type QueueMail<K extends TemplateName> = {
  to: string;
  template: K;
  /** Template data; `appUrl` is filled in. */
  data: Omit<TemplateData<K>, "appUrl">;
};

export async function queueMail<K extends TemplateName>(msg: QueueMail<K>, tx?: Db): Promise<{ mailId: string; jobId: string }> {
  const rendered = renderTemplate(msg.template, { ...msg.data, appUrl: env().APP_URL } as TemplateData<K>);
  const write = async (db: Db) => {
    const row = await db
      .insert(mailLog)
      .values({ to: msg.to, subject: rendered.subject, template: msg.template, html: rendered.html, text: rendered.text })
      .returning({ id: mailLog.id })
      .get();
    // Several attempts: the provider may be briefly unreachable.
    const job = await enqueueJob({ kind: "send-email", payload: { mailId: row.id }, maxAttempts: 5 }, db);
    return { mailId: row.id, jobId: job.id };
  };
  if (tx) return write(tx);
  return getDb().transaction((t) => write(t as unknown as Db));
}

/**
 * Deliver one mail_log row through the Resend SDK and record the outcome.
 * Idempotent: a row already sent is left alone, and the row id goes to the
 * provider as the idempotency key, so a retried job never sends twice.
 */
export async function deliverMail(mailId: string): Promise<{ status: "sent" | "already-sent"; providerId: string | null }> {
  const db = getDb();
  const row = await db.select().from(mailLog).where(eq(mailLog.id, mailId)).get();
  if (!row) throw new MailError(`mail_log row ${mailId} does not exist`, true);
  if (row.status === "sent") return { status: "already-sent", providerId: row.providerId };
  const { data, error } = await mailClient().emails.send(
    { from: env().MAIL_FROM, to: [row.to], subject: row.subject, html: row.html, text: row.text },
    { idempotencyKey: `mail-${row.id}` },
  );
  if (error || !data) {
    const message = error ? `${error.name}: ${error.message}` : "no answer from the mail provider";
    await db.update(mailLog).set({ error: message }).where(eq(mailLog.id, mailId));
    throw new MailError(message, false);
  }
  await db.update(mailLog).set({ status: "sent", providerId: data.id, sentAt: new Date(), error: null }).where(eq(mailLog.id, mailId));
  return { status: "sent", providerId: data.id };
}

/** Mark a row failed for good (the job gave up). */
export async function markMailFailed(mailId: string, message: string): Promise<void> {
  await getDb().update(mailLog).set({ status: "failed", error: message }).where(eq(mailLog.id, mailId));
}

export class MailError extends Error {
  constructor(
    message: string,
    readonly permanent: boolean,
  ) {
    super(message);
    this.name = "MailError";
  }
}
