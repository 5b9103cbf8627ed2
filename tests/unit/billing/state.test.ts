import { describe, expect, it } from "vitest";
import { PAYMENT_GRACE_DAYS } from "@/lib/billing/plans";
import { applyContributorPerk, planFromSubscriptions, type SubscriptionRow } from "@/lib/billing/state";

const DAY = 86_400_000;
const NOW = new Date("2026-06-15T12:00:00Z");
const at = (days: number) => new Date(NOW.getTime() + days * DAY);

let n = 0;
function row(over: Partial<SubscriptionRow>): SubscriptionRow {
  n += 1;
  return {
    id: `row${n}`,
    userId: "u1",
    organizationId: null,
    plan: "researcher",
    interval: "month",
    status: "active",
    seats: 1,
    currentPeriodEnd: at(20),
    cancelAtPeriodEnd: false,
    graceUntil: null,
    stripeSubscriptionId: `sub_${n}`,
    ...over,
  };
}

describe("planFromSubscriptions", () => {
  it("is Open with no subscriptions", () => {
    expect(planFromSubscriptions([], NOW)).toEqual({
      plan: "open",
      subscription: null,
      standing: "none",
      renewsAt: null,
      endsAt: null,
      banner: null,
    });
  });

  it("grants an active subscription and says when it renews", () => {
    const s = planFromSubscriptions([row({})], NOW);
    expect(s).toMatchObject({ plan: "researcher", standing: "active", renewsAt: at(20), endsAt: null, banner: null });
  });

  it("keeps a plan set to cancel until the period end, with a banner, then drops it", () => {
    const r = row({ cancelAtPeriodEnd: true });
    expect(planFromSubscriptions([r], NOW)).toMatchObject({
      plan: "researcher",
      standing: "ending",
      renewsAt: null,
      endsAt: at(20),
      banner: { kind: "ending", endsAt: at(20) },
    });
    expect(planFromSubscriptions([r], at(20)).plan).toBe("open");
  });

  it("keeps a past-due plan until the grace ends, then Open with a lapsed banner", () => {
    const r = row({ status: "past_due", graceUntil: at(3) });
    expect(planFromSubscriptions([r], NOW)).toMatchObject({
      plan: "researcher",
      standing: "grace",
      endsAt: at(3),
      banner: { kind: "payment-failed", graceUntil: at(3) },
    });
    expect(planFromSubscriptions([r], at(3))).toMatchObject({ plan: "open", banner: { kind: "lapsed", since: at(3) } });
  });

  it("falls back to period end + grace days when a past-due row has no grace recorded", () => {
    const r = row({ status: "past_due", currentPeriodEnd: at(-1) });
    const s = planFromSubscriptions([r], NOW);
    expect(s.standing).toBe("grace");
    expect(s.endsAt).toEqual(at(-1 + PAYMENT_GRACE_DAYS));
  });

  it("grants nothing for unpaid, canceled, incomplete or paused subscriptions", () => {
    for (const status of ["unpaid", "canceled", "incomplete", "incomplete_expired", "paused"])
      expect(planFromSubscriptions([row({ status })], NOW).plan, status).toBe("open");
    expect(planFromSubscriptions([row({ status: "canceled" })], NOW).banner).toBeNull();
    expect(planFromSubscriptions([row({ status: "unpaid" })], NOW).banner).toMatchObject({ kind: "lapsed" });
  });

  it("picks the best plan, and among equals the healthiest", () => {
    const own = row({ plan: "researcher" });
    const org = row({ plan: "institution", userId: null, organizationId: "o1", seats: 10 });
    const s = planFromSubscriptions([own, org], NOW);
    expect(s.plan).toBe("institution");
    expect(s.subscription).toMatchObject({ organizationId: "o1", seats: 10 });

    const troubled = row({ status: "past_due", graceUntil: at(2) });
    const healthy = row({});
    expect(planFromSubscriptions([troubled, healthy], NOW).subscription?.id).toBe(healthy.id);
    // …but the subscription in trouble still gets its banner.
    expect(planFromSubscriptions([troubled, healthy], NOW).banner).toMatchObject({ kind: "payment-failed" });
  });

  it("treats trialing like active", () => {
    expect(planFromSubscriptions([row({ status: "trialing" })], NOW).plan).toBe("researcher");
  });
});

describe("applyContributorPerk", () => {
  it("lifts Open to Researcher for an active contributor and never lowers a paid plan", () => {
    expect(applyContributorPerk("open", true)).toBe("researcher");
    expect(applyContributorPerk("open", false)).toBe("open");
    expect(applyContributorPerk("institution", true)).toBe("institution");
    expect(applyContributorPerk("researcher", false)).toBe("researcher");
  });
});
