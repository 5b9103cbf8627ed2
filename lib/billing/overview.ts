import "server-only";
import { and, desc, eq, inArray, notInArray } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { batches, samples, subscriptions } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { CONTRIBUTOR_PERK_DAYS } from "@/lib/auth/plan";
import { env } from "@/lib/env";
import { AppError, errors } from "@/lib/errors";
import { createOrganization, organizationSeats } from "@/lib/organizations";
import { subscriptionRowsForOrganization, subscriptionRowsForUser } from "./account";
import { openBillingPortal, startCheckout, stripeCustomerFor } from "./checkout";
import { BillingError } from "./errors";
import { ownerFromReference, type BillingOwner } from "./owner";
import type { SeatUse } from "./seats";
import { planFromSubscriptions, type BillingBanner, type PaidPlanState } from "./state";
import { getStripe } from "./stripe";

// What the pricing and billing pages need to know about the viewer, and the
// two actions behind their buttons (Checkout, billing portal), each
// authorising the owner before calling lib/billing/checkout.ts. The server
// actions and the JSON routes (app/api/billing/*) share these functions.

/** Subscription statuses that still count as "a subscription here" (as startCheckout decides). */
const ENDED_STATUSES = ["canceled", "incomplete_expired"];

export interface HolderBilling {
  owner: BillingOwner;
  /** The paid state of this holder's own subscriptions (a person's Researcher, an organisation's Institution). */
  paid: PaidPlanState;
  /** A subscription exists that is not ended (Checkout would be refused; the portal manages it). */
  hasLiveSubscription: boolean;
  /** A Stripe customer exists, so the portal can open (invoices, card). */
  hasBillingAccount: boolean;
}

export interface OrganizationBilling extends HolderBilling {
  id: string;
  name: string;
  slug: string;
  role: "owner" | "member";
  seats: SeatUse | null;
}

export interface BillingOverview {
  personal: HolderBilling;
  organizations: OrganizationBilling[];
  /** Until when the contributor perk lasts (last accepted sample + 365 days), null without it. */
  perkUntil: Date | null;
  /** The banner for this person (payment failed, ending, lapsed) across everything that reaches them. */
  banner: BillingBanner | null;
}

async function holderState(owner: BillingOwner, now: Date): Promise<HolderBilling> {
  const db = getDb();
  const where = owner.kind === "user" ? eq(subscriptions.userId, owner.userId) : eq(subscriptions.organizationId, owner.organizationId);
  const rows =
    owner.kind === "user"
      ? (await subscriptionRowsForUser(owner.userId)).filter((r) => r.userId === owner.userId)
      : await subscriptionRowsForOrganization(owner.organizationId);
  const live = await db
    .select({ id: subscriptions.id })
    .from(subscriptions)
    .where(and(where, notInArray(subscriptions.status, ENDED_STATUSES)))
    .get();
  return {
    owner,
    paid: planFromSubscriptions(rows, now),
    hasLiveSubscription: Boolean(live),
    hasBillingAccount: Boolean(await stripeCustomerFor(owner)),
  };
}

/** When the contributor perk ends: the newest accepted sample's decision + CONTRIBUTOR_PERK_DAYS (null if none is that recent). */
export async function contributorPerkUntil(userId: string, now: Date = new Date()): Promise<Date | null> {
  const row = await getDb()
    .select({ decidedAt: samples.decidedAt })
    .from(samples)
    .innerJoin(batches, eq(batches.id, samples.batchId))
    .where(and(eq(batches.contributorId, userId), eq(samples.status, "accepted")))
    .orderBy(desc(samples.decidedAt))
    .limit(1)
    .get();
  if (!row?.decidedAt) return null;
  const until = new Date(row.decidedAt.getTime() + CONTRIBUTOR_PERK_DAYS * 86_400_000);
  return until.getTime() > now.getTime() ? until : null;
}

export async function billingOverview(viewer: Viewer, now: Date = new Date()): Promise<BillingOverview> {
  const personal = await holderState({ kind: "user", userId: viewer.id }, now);
  const organizations: OrganizationBilling[] = [];
  for (const o of viewer.organizations) {
    const state = await holderState({ kind: "organization", organizationId: o.id }, now);
    organizations.push({ ...state, id: o.id, name: o.name, slug: o.slug, role: o.role, seats: await organizationSeats(o.id) });
  }
  const banner = planFromSubscriptions(await subscriptionRowsForUser(viewer.id), now).banner;
  return { personal, organizations, perkUntil: await contributorPerkUntil(viewer.id, now), banner };
}

/** Only the banner (the site-wide grace notice in the shell layout). */
export async function billingBannerFor(userId: string, now: Date = new Date()): Promise<BillingBanner | null> {
  return planFromSubscriptions(await subscriptionRowsForUser(userId), now).banner;
}

/** Names of organisations for banners (id → name), for the ones the viewer belongs to. */
export function organizationName(viewer: Viewer, id: string | null): string | null {
  if (!id) return null;
  return viewer.organizations.find((o) => o.id === id)?.name ?? null;
}

// ───────────────────────────── actions ─────────────────────────────

export const checkoutInput = z
  .object({
    plan: z.enum(["researcher", "institution"], { error: "Choose the Researcher or the Institution plan." }),
    interval: z.enum(["month", "year"], { error: "Choose monthly or yearly billing." }),
    seats: z.coerce.number({ error: "Enter the number of seats." }).int("Seats are a whole number.").optional(),
    /** An organisation the viewer owns (Institution). */
    organizationId: z.string().trim().max(100).optional().or(z.literal("").transform(() => undefined)),
    /** Or the name of a new organisation to create with the viewer as owner (Institution). */
    organizationName: z.string().trim().max(200).optional().or(z.literal("").transform(() => undefined)),
  })
  .strict();
export type CheckoutRequest = z.infer<typeof checkoutInput>;

export const portalInput = z
  .object({ organizationId: z.string().trim().max(100).optional().or(z.literal("").transform(() => undefined)) })
  .strict();

/** BillingError → the app's error vocabulary (a message written for the user is shown; others are logged). */
export function billingToAppError(e: unknown): unknown {
  if (!(e instanceof BillingError)) return e;
  if (!e.showable) return new AppError("upstream-unavailable", { detail: "Payments are not available at the moment. Please try again later.", expose: true, cause: e });
  if (e.status === 404) return errors.notFound(e.message);
  if (e.status === 409) return errors.conflict(e.message);
  return errors.invalid(e.message);
}

function ownedOrganization(viewer: Viewer, organizationId: string) {
  const org = viewer.organizations.find((o) => o.id === organizationId);
  if (!org) throw errors.notFound("There is no such organisation among yours.");
  if (org.role !== "owner") throw errors.forbidden(`Only the owners of ${org.name} can manage its billing.`);
  return org;
}

/**
 * Start Checkout for the viewer. Researcher: for the viewer. Institution: for an
 * organisation the viewer owns, or one created now from `organizationName`.
 */
export async function beginCheckout(viewer: Viewer, input: CheckoutRequest): Promise<{ url: string; sessionId: string; organizationSlug?: string }> {
  const base = env().APP_URL;
  let owner: BillingOwner;
  let organizationSlug: string | undefined;
  if (input.plan === "researcher") {
    if (input.organizationId || input.organizationName) throw errors.invalid("The Researcher plan is for one person; leave the organisation out.");
    owner = { kind: "user", userId: viewer.id };
  } else if (input.organizationId) {
    const org = ownedOrganization(viewer, input.organizationId);
    owner = { kind: "organization", organizationId: org.id };
    organizationSlug = org.slug;
  } else if (input.organizationName) {
    const created = await createOrganization(viewer, input.organizationName);
    owner = { kind: "organization", organizationId: created.id };
    organizationSlug = created.slug;
  } else {
    throw errors.invalid("The Institution plan belongs to an organisation: choose one you own, or name a new one.", {
      organizationName: ["Name the organisation, or choose one you own."],
    });
  }
  try {
    const { url, sessionId } = await startCheckout({
      owner,
      contact: { email: viewer.email, name: viewer.name },
      plan: input.plan,
      interval: input.interval,
      seats: input.seats,
      successUrl: `${base}/pricing/success?session={CHECKOUT_SESSION_ID}`,
      cancelUrl: `${base}/pricing/cancelled`,
    });
    return { url, sessionId, organizationSlug };
  } catch (e) {
    throw billingToAppError(e);
  }
}

/** Open the billing portal for the viewer's own subscription, or an organisation's they own. */
export async function beginPortal(viewer: Viewer, input: z.infer<typeof portalInput>): Promise<{ url: string }> {
  const owner: BillingOwner = input.organizationId
    ? { kind: "organization", organizationId: ownedOrganization(viewer, input.organizationId).id }
    : { kind: "user", userId: viewer.id };
  try {
    return await openBillingPortal(owner, `${env().APP_URL}/account/billing`);
  } catch (e) {
    throw billingToAppError(e);
  }
}

/** Whether Checkout session `sessionId` belongs to the viewer (or an organisation they belong to), and its state. */
export async function checkoutStatusFor(
  viewer: Viewer,
  sessionId: string,
): Promise<{ status: "unknown" } | { status: "waiting" | "active"; plan: "researcher" | "institution"; organization: { name: string; slug: string } | null }> {
  let session;
  try {
    session = await getStripe().checkout.sessions.retrieve(sessionId);
  } catch {
    return { status: "unknown" };
  }
  const owner = ownerFromReference(session.client_reference_id);
  if (!owner) return { status: "unknown" };
  const org = owner.kind === "organization" ? viewer.organizations.find((o) => o.id === owner.organizationId) : undefined;
  if (owner.kind === "user" ? owner.userId !== viewer.id : !org) return { status: "unknown" };
  const plan = session.metadata?.rainprint_plan === "institution" ? "institution" : "researcher";
  const subId = typeof session.subscription === "string" ? session.subscription : (session.subscription?.id ?? null);
  const organization = org ? { name: org.name, slug: org.slug } : null;
  if (!subId) return { status: "waiting", plan, organization };
  const row = await getDb()
    .select({ status: subscriptions.status })
    .from(subscriptions)
    .where(and(eq(subscriptions.stripeSubscriptionId, subId), inArray(subscriptions.status, ["active", "trialing", "past_due"])))
    .get();
  return { status: row ? "active" : "waiting", plan, organization };
}
