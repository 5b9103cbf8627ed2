import "server-only";
import { and, eq, gte } from "drizzle-orm";
import { getDb } from "@/db";
import { batches, samples, type Plan } from "@/db/schema";
import { paidPlanForUser } from "@/lib/billing/account";
import { applyContributorPerk } from "@/lib/billing/state";

// Plan resolution, read from the database on every call:
//   Institution — member of an organisation with an institution subscription that applies;
//   Researcher  — an individual subscription that applies, or the contributor perk
//                 (accepted samples decided within the last 12 months);
//   Open        — everyone else.
// Which subscription rows "apply" (active, trialing, set to cancel but not yet
// ended, past due within the grace period) is decided by lib/billing/state.ts.

/** Why a viewer has their plan (shown on the account page, used by billing). */
export type PlanSource = "organization" | "subscription" | "contributor-perk" | "none";

export type PlanResolution = { plan: Plan; planSource: PlanSource; organizationId?: string };

/** How long accepted data keeps the contributor perk alive. */
export const CONTRIBUTOR_PERK_DAYS = 365;

export async function resolvePlan(userId: string, now: Date = new Date()): Promise<PlanResolution> {
  const paid = await paidPlanForUser(userId, now);
  const perk = paid.plan === "open" ? await hasContributorPerk(userId, now) : false;
  const plan = applyContributorPerk(paid.plan, perk);
  if (plan !== paid.plan) return { plan, planSource: "contributor-perk" };
  if (!paid.subscription) return { plan, planSource: "none" };
  if (paid.subscription.organizationId) return { plan, planSource: "organization", organizationId: paid.subscription.organizationId };
  return { plan, planSource: "subscription" };
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
