// Billing notices → e-mail (lib/billing/mail.ts): the webhook route's
// transaction queues real templates through queueMail — to the person for a
// Researcher subscription, to the owners for an organisation's. Runs the
// payments stand-in in-process (harness.ts) with the mail handler installed.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { jobs, mailLog, webhookEvents } from "@/db/schema";
import { openBillingPortal, startCheckout } from "@/lib/billing/checkout";
import { installBillingMail } from "@/lib/billing/mail";
import type { BillingOwner } from "@/lib/billing/owner";
import { PAYMENT_GRACE_DAYS } from "@/lib/billing/plans";
import { getStripe, makeOrganization, makeUser, postForm, startHarness, waitFor, type Harness } from "./harness";

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
  installBillingMail(); // the harness records notices instead; put the real handler back
});
afterAll(async () => {
  await h.close();
});
beforeEach(async () => {
  await h.control("/reset", {});
});

const mailsTo = (to: string) => getDb().select().from(mailLog).where(eq(mailLog.to, to)).all();

async function pay(owner: BillingOwner, email: string, plan: "researcher" | "institution", seats?: number) {
  const { url, sessionId } = await startCheckout({
    owner,
    contact: { email },
    plan,
    interval: "month",
    seats,
    successUrl: "http://localhost:3000/pricing/success?session={CHECKOUT_SESSION_ID}",
    cancelUrl: "http://localhost:3000/pricing/cancelled",
  });
  expect((await postForm(url, { action: "pay", outcome: "succeed" })).status).toBe(303);
  await h.settle();
  return sessionId;
}

describe("billing e-mails", () => {
  it("a Researcher checkout queues a welcome and a receipt to the person, each with its send job", async () => {
    const u = await makeUser("Noor Castellanos");
    await pay({ kind: "user", userId: u.id }, u.email, "researcher");
    const mails = await mailsTo(u.email);
    expect(mails.map((m) => m.template).sort()).toEqual(["billing-payment-received", "billing-subscription-started"]);
    const receipt = mails.find((m) => m.template === "billing-payment-received")!;
    expect(receipt.subject).toMatch(/^Receipt: €19\.00 for Rainprint Researcher \(RPS-\d{5}\)$/);
    expect(receipt.text).toContain("Hello Noor Castellanos,");
    expect(receipt.text).toMatch(/Invoice RPS-\d{5} covers/);
    expect(receipt.html).toMatch(/View the invoice/);
    const welcome = mails.find((m) => m.template === "billing-subscription-started")!;
    expect(welcome.subject).toBe("Your account is now on the Researcher plan");
    expect(welcome.text).toMatch(/It renews on \d{1,2} \w+ \d{4}/);
    const sendJobs = await getDb().select().from(jobs).where(eq(jobs.kind, "send-email")).all();
    for (const m of mails) expect(sendJobs.some((j) => (j.payload as { mailId: string }).mailId === m.id)).toBe(true);
  });

  it("an organisation's notices go to its owners, naming the organisation", async () => {
    const owner = await makeUser("Greta Vasquez-Moll");
    const org = await makeOrganization(owner.id);
    const o: BillingOwner = { kind: "organization", organizationId: org.id };
    await pay(o, owner.email, "institution", 3);
    const started = (await mailsTo(owner.email)).find((m) => m.template === "billing-subscription-started")!;
    expect(started.subject).toMatch(/^Test Institute \d+ is now on the Institution plan$/);
    expect(started.text).toMatch(/Institution, billed monthly, 3 seats/);
    expect(started.text).toMatch(/because you own Test Institute/);

    // Cancel in the portal → "will end on …" with the period end.
    const { url } = await openBillingPortal(o, "http://localhost:3000/account/billing");
    const sub = (await h.control<{ subscriptions: Record<string, { id: string }> }>("/state")).subscriptions;
    const subId = Object.keys(sub)[0];
    expect((await postForm(url, { action: "cancel", subscription: subId })).status).toBe(303);
    await h.settle();
    const cancel = (await mailsTo(owner.email)).find((m) => m.template === "billing-cancellation-scheduled")!;
    expect(cancel.subject).toMatch(/^The Institution plan of Test Institute \d+ will end on \d{1,2} \w+ \d{4}$/);
    expect(cancel.text).toMatch(/nothing more will be charged/);
  });

  it("a failed renewal e-mails the grace end and what happens after; the end of dunning e-mails that the plan ended", async () => {
    const u = await makeUser("Pelle Marsh");
    const owner: BillingOwner = { kind: "user", userId: u.id };
    await pay(owner, u.email, "researcher");
    const { data: customers } = await getStripe().customers.list({ email: u.email });
    await h.control("/payments/decline", { customer: customers[0].id, attempts: "always" });
    const clock = await h.control<{ events: { type: string; created: number }[] }>("/clock", { advance_days: 31 });
    const failedAt = clock.events.find((e) => e.type === "invoice.payment_failed")!.created;
    await waitFor(async () => (await mailsTo(u.email)).some((m) => m.template === "billing-payment-failed"), "payment-failed e-mail");
    const failed = (await mailsTo(u.email)).find((m) => m.template === "billing-payment-failed")!;
    expect(failed.subject).toBe("Action needed: a payment of €19.00 for Rainprint Researcher failed");
    const graceText = new Date((failedAt + PAYMENT_GRACE_DAYS * 86_400) * 1000).toLocaleDateString("en-GB", {
      day: "numeric",
      month: "long",
      year: "numeric",
      timeZone: "UTC",
    });
    expect(failed.text).toContain(`keeps working until ${graceText}`);
    expect(failed.text).toMatch(/free Open plan: downloads, batch lookups and API keys stop working/);
    expect(failed.text).toMatch(/We will try the card again on/);

    // Dunning retries 3, 5 and 7 days apart, then the subscription is cancelled.
    await h.control("/clock", { advance_days: 16 });
    await waitFor(async () => (await mailsTo(u.email)).some((m) => m.template === "billing-subscription-ended"), "subscription-ended e-mail");
    const ended = (await mailsTo(u.email)).find((m) => m.template === "billing-subscription-ended")!;
    expect(ended.text).toMatch(/could not be collected after several attempts/);
  });

  it("a replayed event queues no second e-mail", async () => {
    const u = await makeUser("Replay Person");
    await pay({ kind: "user", userId: u.id }, u.email, "researcher");
    const before = (await mailsTo(u.email)).length;
    const { data } = await h.control<{ data: { id: string }[] }>("/events?type=invoice.paid");
    const last = data.at(-1)!;
    expect(await getDb().select().from(webhookEvents).where(eq(webhookEvents.id, last.id)).get()).toMatchObject({ type: "invoice.paid" });
    await h.control(`/events/${last.id}/deliver`, {});
    await h.settle();
    expect((await mailsTo(u.email)).length).toBe(before);
  });
});
