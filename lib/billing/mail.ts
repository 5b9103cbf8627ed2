import "server-only";
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db";
import { memberships, organizations, users } from "@/db/schema";
import { queueMail } from "@/lib/mail";
import { setBillingNoticeHandler, type BillingNoticeHandler, type BillingNotices, type DbTx, type InvoiceSummary } from "./notices";
import type { BillingOwner } from "./owner";
import { PLAN_CATALOGUE, type Plan } from "./plans";

// Billing notices → e-mail. The webhook handler calls the notice handler inside
// the transaction that records the Stripe event; queueMail joins that
// transaction, so an e-mail is queued exactly once per event (a failed event
// queues nothing and is delivered again). A personal subscription's notices go
// to the person; an organisation's go to each of its owners.

interface Recipient {
  email: string;
  name: string | null;
}

async function recipientsFor(tx: DbTx, owner: BillingOwner): Promise<{ organization: string | null; to: Recipient[] }> {
  if (owner.kind === "user") {
    const u = await tx.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, owner.userId)).get();
    return { organization: null, to: u ? [u] : [] };
  }
  const org = await tx.select({ name: organizations.name }).from(organizations).where(eq(organizations.id, owner.organizationId)).get();
  const owners = await tx
    .select({ email: users.email, name: users.name })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.organizationId, owner.organizationId), eq(memberships.role, "owner")));
  return { organization: org?.name ?? null, to: owners };
}

const iso = (d: Date | null): string | null => (d ? d.toISOString() : null);
const invoiceData = (inv: InvoiceSummary) => ({
  number: inv.number,
  amountCents: inv.amountCents,
  currency: inv.currency,
  periodStart: inv.periodStart.toISOString(),
  periodEnd: inv.periodEnd.toISOString(),
  hostedUrl: inv.hostedUrl,
});
const seatsOf = (plan: Plan, seats: number) => (PLAN_CATALOGUE[plan].seats ? seats : null);

/** Queue the e-mails for one notice, inside the caller's transaction. */
export const mailBillingNotice: BillingNoticeHandler = async (kind, data, { tx }) => {
  const { organization, to } = await recipientsFor(tx, data.owner);
  const db = tx as unknown as Db;
  for (const r of to) {
    const common = {
      name: r.name,
      organization,
      planName: PLAN_CATALOGUE[data.plan].name,
      interval: data.interval,
      seats: seatsOf(data.plan, data.seats),
    };
    switch (kind) {
      case "subscription-started": {
        const d = data as BillingNotices["subscription-started"];
        await queueMail({ to: r.email, template: "billing-subscription-started", data: { ...common, renewsAt: iso(d.renewsAt) } }, db);
        break;
      }
      case "payment-received": {
        const d = data as BillingNotices["payment-received"];
        await queueMail({ to: r.email, template: "billing-payment-received", data: { ...common, invoice: invoiceData(d.invoice) } }, db);
        break;
      }
      case "plan-changed": {
        const d = data as BillingNotices["plan-changed"];
        const before = { planName: PLAN_CATALOGUE[d.before.plan].name, interval: d.before.interval, seats: seatsOf(d.before.plan, d.before.seats) };
        await queueMail({ to: r.email, template: "billing-plan-changed", data: { ...common, before } }, db);
        break;
      }
      case "cancellation-scheduled": {
        const d = data as BillingNotices["cancellation-scheduled"];
        await queueMail({ to: r.email, template: "billing-cancellation-scheduled", data: { ...common, endsAt: iso(d.endsAt) } }, db);
        break;
      }
      case "cancellation-withdrawn": {
        const d = data as BillingNotices["cancellation-withdrawn"];
        await queueMail({ to: r.email, template: "billing-cancellation-withdrawn", data: { ...common, renewsAt: iso(d.renewsAt) } }, db);
        break;
      }
      case "payment-failed": {
        const d = data as BillingNotices["payment-failed"];
        await queueMail(
          {
            to: r.email,
            template: "billing-payment-failed",
            data: { ...common, invoice: invoiceData(d.invoice), graceUntil: d.graceUntil.toISOString(), nextAttemptAt: iso(d.nextAttemptAt) },
          },
          db,
        );
        break;
      }
      case "subscription-ended": {
        const d = data as BillingNotices["subscription-ended"];
        await queueMail({ to: r.email, template: "billing-subscription-ended", data: { ...common, reason: d.reason } }, db);
        break;
      }
    }
  }
};

/** Send billing notices by e-mail (the webhook route installs this when it loads). */
export function installBillingMail(): () => void {
  return setBillingNoticeHandler(mailBillingNotice);
}
