import type { subscriptions } from "@/db/schema";
import { PAYMENT_GRACE_DAYS, planRank, type BillingInterval, type Plan } from "./plans";

// The effective paid plan from subscription rows: pure, no database, no clock
// of its own (the caller passes `now`). The guard in lib/auth calls it with the
// rows that reach a user — their own Researcher subscription and the
// Institution subscriptions of the organisations they belong to — and combines
// the result with the contributor perk (applyContributorPerk below).
//
// Stripe statuses (https://docs.stripe.com/billing/subscriptions/overview#subscription-statuses [trade]):
//   active, trialing            → the plan applies (until the period end when set to cancel);
//   past_due                    → the plan applies until graceUntil, then Open;
//   unpaid, canceled, incomplete, incomplete_expired, paused → Open.

export type SubscriptionRow = Pick<
  typeof subscriptions.$inferSelect,
  | "id"
  | "userId"
  | "organizationId"
  | "plan"
  | "interval"
  | "status"
  | "seats"
  | "currentPeriodEnd"
  | "cancelAtPeriodEnd"
  | "graceUntil"
  | "stripeSubscriptionId"
>;

const DAY_MS = 86_400_000;

export type BillingBanner =
  /** A payment failed; the plan keeps working until graceUntil. */
  | { kind: "payment-failed"; plan: Plan; graceUntil: Date; organizationId: string | null }
  /** Cancelled in the portal; the plan ends at endsAt. */
  | { kind: "ending"; plan: Plan; endsAt: Date; organizationId: string | null }
  /** A payment failed and the grace period is over: the account is on Open until it is fixed. */
  | { kind: "lapsed"; plan: Plan; since: Date; organizationId: string | null };

export interface PaidPlanState {
  /** The plan that applies now from subscriptions alone ("open" when none does). */
  plan: Plan;
  /** The subscription that grants it (null on Open). */
  subscription: {
    id: string;
    stripeSubscriptionId: string;
    userId: string | null;
    organizationId: string | null;
    interval: BillingInterval;
    status: string;
    seats: number;
  } | null;
  /** "active" (renews), "ending" (set to cancel), "grace" (payment failed), or "none". */
  standing: "active" | "ending" | "grace" | "none";
  /** Next renewal when it renews, else null. */
  renewsAt: Date | null;
  /** When the plan stops unless something changes: period end when ending, grace end when in grace. */
  endsAt: Date | null;
  /** The one banner to show, most urgent first; null when all is well. */
  banner: BillingBanner | null;
}

interface Entitlement {
  row: SubscriptionRow;
  standing: "active" | "ending" | "grace";
  endsAt: Date | null;
}

/** Whether one row grants its plan at `now`, and how. */
export function entitlementOf(row: SubscriptionRow, now: Date): Entitlement | null {
  const t = now.getTime();
  const periodEnd = row.currentPeriodEnd?.getTime() ?? null;
  switch (row.status) {
    case "active":
    case "trialing":
      if (row.cancelAtPeriodEnd) {
        // A cancellation is certain: stop at the period end even if the webhook is late.
        if (periodEnd !== null && t >= periodEnd) return null;
        return { row, standing: "ending", endsAt: row.currentPeriodEnd };
      }
      return { row, standing: "active", endsAt: null };
    case "past_due": {
      const grace = graceEnd(row);
      if (grace !== null && t >= grace.getTime()) return null;
      return { row, standing: "grace", endsAt: grace };
    }
    default:
      return null;
  }
}

/** The end of a past-due row's grace: graceUntil, or (if unknown) the period end plus the grace days. */
function graceEnd(row: SubscriptionRow): Date | null {
  if (row.graceUntil) return row.graceUntil;
  if (row.currentPeriodEnd) return new Date(row.currentPeriodEnd.getTime() + PAYMENT_GRACE_DAYS * DAY_MS);
  return null;
}

const standingOrder = { active: 0, ending: 1, grace: 2 } as const;

export function planFromSubscriptions(rows: readonly SubscriptionRow[], now: Date): PaidPlanState {
  const entitled = rows.map((r) => entitlementOf(r, now)).filter((e): e is Entitlement => e !== null);
  // Best plan first; among equals the healthiest, then the one lasting longest.
  entitled.sort(
    (a, b) =>
      planRank(b.row.plan) - planRank(a.row.plan) ||
      standingOrder[a.standing] - standingOrder[b.standing] ||
      (b.endsAt?.getTime() ?? Infinity) - (a.endsAt?.getTime() ?? Infinity),
  );
  const best = entitled[0];
  if (!best) {
    return { plan: "open", subscription: null, standing: "none", renewsAt: null, endsAt: null, banner: lapsedBanner(rows, now) };
  }
  const r = best.row;
  const banner: BillingBanner | null =
    best.standing === "grace" && best.endsAt
      ? { kind: "payment-failed", plan: r.plan, graceUntil: best.endsAt, organizationId: r.organizationId }
      : best.standing === "ending" && best.endsAt
        ? { kind: "ending", plan: r.plan, endsAt: best.endsAt, organizationId: r.organizationId }
        : otherGraceBanner(entitled, best);
  return {
    plan: r.plan,
    subscription: {
      id: r.id,
      stripeSubscriptionId: r.stripeSubscriptionId,
      userId: r.userId,
      organizationId: r.organizationId,
      interval: r.interval,
      status: r.status,
      seats: r.seats,
    },
    standing: best.standing,
    renewsAt: best.standing === "active" ? r.currentPeriodEnd : null,
    endsAt: best.endsAt,
    banner,
  };
}

/** A second subscription in trouble still deserves a banner when the best one is healthy. */
function otherGraceBanner(entitled: Entitlement[], best: Entitlement): BillingBanner | null {
  const other = entitled.find((e) => e !== best && e.standing === "grace" && e.endsAt);
  return other && other.endsAt
    ? { kind: "payment-failed", plan: other.row.plan, graceUntil: other.endsAt, organizationId: other.row.organizationId }
    : null;
}

/** Open because a payment failed (not because someone cancelled): say so until it is fixed or ended. */
function lapsedBanner(rows: readonly SubscriptionRow[], now: Date): BillingBanner | null {
  const lapsed = rows
    .filter((r) => r.status === "past_due" || r.status === "unpaid")
    .sort((a, b) => planRank(b.plan) - planRank(a.plan));
  const r = lapsed[0];
  if (!r) return null;
  const since = graceEnd(r) ?? now;
  return { kind: "lapsed", plan: r.plan, since, organizationId: r.organizationId };
}

/**
 * The contributor perk: an account with accepted samples in the last 12 months
 * gets Researcher features without paying. Never lowers a paid plan.
 */
export function applyContributorPerk(paid: Plan, activeContributor: boolean): Plan {
  if (activeContributor && planRank(paid) < planRank("researcher")) return "researcher";
  return paid;
}
