import "server-only";
import { z } from "zod";
import { deliverMail, MailError, markMailFailed } from "@/lib/mail";
import { PermanentJobError, type JobHandler } from "../types";

const payload = z.object({ mailId: z.string().min(1) });

/** Deliver one queued mail_log row; the last failed attempt marks the row failed. */
export const sendEmailJob: JobHandler<unknown> = async (job) => {
  const parsed = payload.safeParse(job.payload);
  if (!parsed.success) throw new PermanentJobError("send-email needs { mailId }");
  const { mailId } = parsed.data;
  try {
    return await deliverMail(mailId);
  } catch (e) {
    const lastAttempt = job.attempts >= job.maxAttempts || (e instanceof MailError && e.permanent);
    if (lastAttempt) await markMailFailed(mailId, e instanceof Error ? e.message : String(e));
    if (e instanceof MailError && e.permanent) throw new PermanentJobError(e.message);
    throw e;
  }
};
