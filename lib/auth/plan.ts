import "server-only";
import { and, eq, gte, inArray, isNotNull, or, gt } from "drizzle-orm";
import { getDb } from "@/db";
import { batches, memberships, samples, subscriptions, type Plan } from "@/db/schema";

// Plan resolution, read from the database on every call:
//   Institution — member of an organisation with an active institution subscription;
//   Researcher  — an active individual subscription, or the contributor perk
//                 (accepted samples decided within the last 12 months);
//   Open        — everyone else.

/** Why a viewer has their plan (shown on the account page, used by billing). */
export type PlanSource = "organization" | "subscription" | "contributor-perk" | "none";

export type PlanResolution = { plan: Plan; planSource: PlanSource; organizationId?: string };

/** Stripe subscription statuses that grant access. `past_due` keeps access until `graceUntil`. */
export const ACTIVE_SUBSCRIPTION_STATUSES = ["active", "trialing"] as const;

/** How long accepted data keeps the contributor perk alive. */
export const CONTRIBUTOR_PERK_DAYS = 365;

function activeSubscription(now: Date) {
  return or(
    inArray(subscriptions.status, [...ACTIVE_SUBSCRIPTION_STATUSES]),
    and(eq(subscriptions.status, "past_due"), isNotNull(subscriptions.graceUntil), gt(subscriptions.graceUntil, now)),
  );
}

export async function resolvePlan(userId: string, now: Date = new Date()): Promise<PlanResolution> {
  const db = getDb();

  const orgSub = await db
    .select({ organizationId: subscriptions.organizationId })
    .from(subscriptions)
    .innerJoin(memberships, eq(memberships.organizationId, subscriptions.organizationId))
    .where(and(eq(memberships.userId, userId), eq(subscriptions.plan, "institution"), activeSubscription(now)))
    .limit(1)
    .get();
  if (orgSub?.organizationId) return { plan: "institution", planSource: "organization", organizationId: orgSub.organizationId };

  const ownSub = await db
    .select({ id: subscriptions.id })
    .from(subscriptions)
    .where(and(eq(subscriptions.userId, userId), eq(subscriptions.plan, "researcher"), activeSubscription(now)))
    .limit(1)
    .get();
  if (ownSub) return { plan: "researcher", planSource: "subscription" };

  if (await hasContributorPerk(userId, now)) return { plan: "researcher", planSource: "contributor-perk" };

  return { plan: "open", planSource: "none" };
}

/** True when the user contributed samples that were accepted within the last CONTRIBUTOR_PERK_DAYS. */
export async function hasContributorPerk(userId: string, now: Date = new Date()): Promise<boolean> {
  const since = new Date(now.getTime() - CONTRIBUTOR_PERK_DAYS * 86_400_000);
  const row = await getDb()
    .select({ id: samples.id })
    .from(samples)
    .innerJoin(batches, eq(batches.id, samples.batchId))
    .where(and(eq(batches.contributorId, userId), eq(samples.status, "accepted"), gte(samples.decidedAt, since)))
    .limit(1)
    .get();
  return Boolean(row);
}
