import "server-only";
import { eq, inArray, or } from "drizzle-orm";
import { getDb } from "@/db";
import { memberships, subscriptions } from "@/db/schema";
import { planFromSubscriptions, type PaidPlanState, type SubscriptionRow } from "./state";

// Reading plan state from the database for one person. The guard in lib/auth
// calls paidPlanForUser (then applies the contributor perk); the billing page
// reads the same.

const rowColumns = {
  id: subscriptions.id,
  userId: subscriptions.userId,
  organizationId: subscriptions.organizationId,
  plan: subscriptions.plan,
  interval: subscriptions.interval,
  status: subscriptions.status,
  seats: subscriptions.seats,
  currentPeriodEnd: subscriptions.currentPeriodEnd,
  cancelAtPeriodEnd: subscriptions.cancelAtPeriodEnd,
  graceUntil: subscriptions.graceUntil,
  stripeSubscriptionId: subscriptions.stripeSubscriptionId,
};

/**
 * The subscriptions that can reach a person: their own, and those of every
 * organisation they belong to. (Whether a member holds one of the
 * organisation's seats is the seats rule's business, in lib/auth.)
 */
export async function subscriptionRowsForUser(userId: string): Promise<SubscriptionRow[]> {
  const db = getDb();
  const orgs = await db
    .select({ organizationId: memberships.organizationId })
    .from(memberships)
    .where(eq(memberships.userId, userId));
  const orgIds = orgs.map((o) => o.organizationId);
  return db
    .select(rowColumns)
    .from(subscriptions)
    .where(
      orgIds.length
        ? or(eq(subscriptions.userId, userId), inArray(subscriptions.organizationId, orgIds))
        : eq(subscriptions.userId, userId),
    );
}

export async function subscriptionRowsForOrganization(organizationId: string): Promise<SubscriptionRow[]> {
  return getDb().select(rowColumns).from(subscriptions).where(eq(subscriptions.organizationId, organizationId));
}

/** The paid plan that applies to a person now (before the contributor perk). */
export async function paidPlanForUser(userId: string, now: Date = new Date()): Promise<PaidPlanState> {
  return planFromSubscriptions(await subscriptionRowsForUser(userId), now);
}
