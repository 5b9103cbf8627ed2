// Demo subscriptions, created the way a customer would create them: Stripe
// customer → Checkout session → the payments stand-in's pay page → signed
// webhooks → the app's webhook route → the subscriptions table.
//   - researcher@rainprint.example: Researcher, monthly;
//   - Lakeshore Basin Water Institute (owner institution@rainprint.example):
//     Institution, yearly, DEMO_SEATS seats.
// Run after the stand-ins, the worker and the app are up (scripts/start.mjs,
// tests/e2e/global-setup.ts):
//   node --conditions=react-server --import tsx scripts/seed-billing.ts
// Idempotent: an owner with a live subscription that the payments service
// still knows is left alone. If the stand-in's state was deleted while the
// database still holds the subscription, the stale rows are removed and the
// subscription is created again. Needs APP_URL, DATABASE_URL and the Stripe
// settings (STRIPE_API_BASE for the stand-in).
import { and, eq, notInArray } from "drizzle-orm";
import { closeDb, getDb } from "../db";
import { billingCustomers, organizations, subscriptions, users } from "../db/schema";
import demo from "../db/seed/demo-accounts.json";
import { startCheckout } from "../lib/billing/checkout";
import { ownerColumns, type BillingOwner } from "../lib/billing/owner";
import { getStripe } from "../lib/billing/stripe";
import { env } from "../lib/env";

export const DEMO_SEATS = 5;
const WAIT_MS = 90_000;

const log = (m: string) => console.log(`[seed-billing] ${m}`);

interface Target {
  label: string;
  owner: BillingOwner;
  contact: { email: string; name: string | null };
  plan: "researcher" | "institution";
  interval: "month" | "year";
  seats?: number;
}

function ownerWhere(owner: BillingOwner) {
  return owner.kind === "user" ? eq(subscriptions.userId, owner.userId) : eq(subscriptions.organizationId, owner.organizationId);
}

async function liveRow(owner: BillingOwner) {
  return getDb()
    .select()
    .from(subscriptions)
    .where(and(ownerWhere(owner), notInArray(subscriptions.status, ["canceled", "incomplete_expired"])))
    .get();
}

/** True when the payments service still has this subscription (not cancelled). */
async function knownToStripe(stripeSubscriptionId: string): Promise<boolean> {
  try {
    const sub = await getStripe().subscriptions.retrieve(stripeSubscriptionId);
    return sub.status !== "canceled";
  } catch (e) {
    if ((e as { code?: string }).code === "resource_missing") return false;
    throw e;
  }
}

async function forgetStale(owner: BillingOwner): Promise<void> {
  const db = getDb();
  const cols = ownerColumns(owner);
  await db.delete(subscriptions).where(ownerWhere(owner));
  await db
    .delete(billingCustomers)
    .where(cols.userId ? eq(billingCustomers.userId, cols.userId) : eq(billingCustomers.organizationId, cols.organizationId!));
}

async function seedOne(t: Target): Promise<void> {
  const existing = await liveRow(t.owner);
  if (existing) {
    if (await knownToStripe(existing.stripeSubscriptionId)) {
      log(`${t.label}: already on ${existing.plan} (${existing.status}); nothing to do`);
      return;
    }
    log(`${t.label}: the payments service no longer knows subscription ${existing.stripeSubscriptionId}; creating it again`);
    await forgetStale(t.owner);
  }
  const base = env().APP_URL;
  const { sessionId, url } = await startCheckout({
    owner: t.owner,
    contact: t.contact,
    plan: t.plan,
    interval: t.interval,
    seats: t.seats,
    successUrl: `${base}/pricing/success?session={CHECKOUT_SESSION_ID}`,
    cancelUrl: `${base}/pricing/cancelled`,
  });
  // The stand-in's pay page, as a browser would submit it ("Pay", succeed).
  const res = await fetch(url, {
    method: "POST",
    headers: { "Content-Type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ action: "pay", outcome: "succeed" }).toString(),
    redirect: "manual",
  });
  if (res.status !== 303) throw new Error(`${t.label}: paying checkout ${sessionId} answered ${res.status}: ${(await res.text()).slice(0, 300)}`);
  const deadline = Date.now() + WAIT_MS;
  for (;;) {
    const row = await liveRow(t.owner);
    if (row && row.status === "active") {
      log(`${t.label}: ${row.plan} active (${row.interval}ly, ${row.seats} seat${row.seats === 1 ? "" : "s"})`);
      return;
    }
    if (Date.now() > deadline) throw new Error(`${t.label}: the webhook did not arrive within ${WAIT_MS / 1000} s (is the app running at ${base}?)`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

async function main(): Promise<void> {
  const db = getDb();
  const account = (key: string) => {
    const a = demo.accounts.find((x) => x.key === key);
    if (!a) throw new Error(`no demo account ${key}`);
    return a;
  };
  const userByEmail = async (email: string) => {
    const u = await db.select({ id: users.id, email: users.email, name: users.name }).from(users).where(eq(users.email, email.toLowerCase())).get();
    if (!u) throw new Error(`the demo account ${email} is missing: run scripts/setup.ts first`);
    return u;
  };
  const researcher = await userByEmail(account("researcher").email);
  const owner = await userByEmail(account(demo.organization.ownerKey).email);
  const org = await db.select({ id: organizations.id }).from(organizations).where(eq(organizations.slug, demo.organization.slug)).get();
  if (!org) throw new Error(`the demo organisation ${demo.organization.slug} is missing: run scripts/setup.ts first`);

  await seedOne({
    label: researcher.email,
    owner: { kind: "user", userId: researcher.id },
    contact: { email: researcher.email, name: researcher.name },
    plan: "researcher",
    interval: "month",
  });
  await seedOne({
    label: demo.organization.slug,
    owner: { kind: "organization", organizationId: org.id },
    contact: { email: owner.email, name: owner.name },
    plan: "institution",
    interval: "year",
    seats: DEMO_SEATS,
  });
}

main()
  .then(() => {
    closeDb();
  })
  .catch((e: unknown) => {
    console.error(`[seed-billing] failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    closeDb();
    process.exit(1);
  });
