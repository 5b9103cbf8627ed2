import "server-only";
import { eq, inArray, or } from "drizzle-orm";
import { getDb } from "@/db";
import { memberships, subscriptions } from "@/db/schema";
import { assignSeats, type SeatMember } from "./seats";
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
 * organisation they belong to in which they hold a seat (lib/billing/seats.ts:
 * when an organisation has more members than seats, the members who joined
 * last get nothing from its subscription).
 */
export async function subscriptionRowsForUser(userId: string): Promise<SubscriptionRow[]> {
  const db = getDb();
  const orgs = await db
    .select({ organizationId: memberships.organizationId })
    .from(memberships)
    .where(eq(memberships.userId, userId));
  const orgIds = orgs.map((o) => o.organizationId);
  const rows = await db
    .select(rowColumns)
    .from(subscriptions)
    .where(
      orgIds.length
        ? or(eq(subscriptions.userId, userId), inArray(subscriptions.organizationId, orgIds))
        : eq(subscriptions.userId, userId),
    );
  const orgRows = rows.filter((r) => r.organizationId);
  if (!orgRows.length) return rows;
  const members = await seatMembersOf([...new Set(orgRows.map((r) => r.organizationId!))]);
  return rows.filter(
    (r) => !r.organizationId || assignSeats(members.get(r.organizationId) ?? [], r.seats).holders.includes(userId),
  );
}

/** Members of the given organisations, for the seat rule. */
export async function seatMembersOf(organizationIds: string[]): Promise<Map<string, SeatMember[]>> {
  const out = new Map<string, SeatMember[]>();
  if (!organizationIds.length) return out;
  const rows = await getDb()
    .select({
      organizationId: memberships.organizationId,
      userId: memberships.userId,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .where(inArray(memberships.organizationId, organizationIds));
  for (const r of rows) {
    const list = out.get(r.organizationId) ?? [];
    list.push({ userId: r.userId, role: r.role, joinedAt: r.joinedAt });
    out.set(r.organizationId, list);
  }
  return out;
}

export async function subscriptionRowsForOrganization(organizationId: string): Promise<SubscriptionRow[]> {
  return getDb().select(rowColumns).from(subscriptions).where(eq(subscriptions.organizationId, organizationId));
}

/** The paid plan that applies to a person now (before the contributor perk). */
export async function paidPlanForUser(userId: string, now: Date = new Date()): Promise<PaidPlanState> {
  return planFromSubscriptions(await subscriptionRowsForUser(userId), now);
}
