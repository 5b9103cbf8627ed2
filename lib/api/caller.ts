import "server-only";
import type { Plan } from "@/db/schema";
import { getViewer, loadViewer } from "@/lib/auth/guard";
import { clientAddress } from "@/lib/auth/options";
import { subscriptionRowsForOrganization } from "@/lib/billing/account";
import { lowestPlanAllowing, PLAN_CATALOGUE } from "@/lib/billing/plans";
import { planFromSubscriptions } from "@/lib/billing/state";
import { AppError } from "@/lib/errors";
import { parseAuthorization } from "./key-format";
import { findActiveKey } from "./keys";

// Who is calling the public API, and which quota partition their requests
// count in:
//   - an API key (`Authorization: Bearer rp_live_…`): an organisation's key
//     counts for the organisation (`org:<id>`), a personal key for its
//     account (`user:<id>`);
//   - a session cookie (the app's own pages calling the API): the signed-in
//     person, counted like their plan (`org:<id>` on Institution, else `user:<id>`);
//   - nobody: an anonymous caller on the Open plan, counted per client address
//     (`anon:<address>`).
// A header that is present but not a valid key is refused (401); it never
// falls back to anonymous.
//
// The key itself is looked up on every request (a revocation counts at once);
// the plan behind it (subscription state, contributor perk, whether the
// account is enabled) is remembered per key holder for PLAN_CACHE_MS, since
// working it out takes several queries. A lapsed plan or a disabled account
// therefore stops a key within that time on every app instance.
//
// Client address: the first X-Forwarded-For entry (lib/auth/options.ts
// `clientAddress`). Behind a proxy that entry is only trustworthy when the
// proxy in front overwrites the header rather than appending to what the
// client sent; otherwise anonymous callers can choose their own partition.

export type ApiCaller = {
  kind: "key" | "session" | "anonymous";
  plan: Plan;
  userId: string | null;
  /** The organisation whose plan applies (Institution), else null. */
  organizationId: string | null;
  key: { id: string; name: string; prefix: string } | null;
  /** Client address (for anonymous partitions and logs). */
  address: string;
  /** api_usage subject of the caller's daily quota. */
  subject: string;
};

/** How long the plan of a key's holder is remembered (milliseconds). */
export const PLAN_CACHE_MS = 10_000;

type HolderPlan = { plan: Plan; organizationId: string | null; enabled: boolean; at: number };
const globalForPlans = globalThis as unknown as { __rainprintKeyPlans?: Map<string, HolderPlan> };
const planCache = () => (globalForPlans.__rainprintKeyPlans ??= new Map());

/** Forget remembered plans (tests, or after a change that must count at once in this process). */
export function forgetCachedPlans(): void {
  planCache().clear();
}

async function holderPlan(key: { userId: string; organizationId: string | null }, now: Date): Promise<HolderPlan> {
  const id = key.organizationId ? `org:${key.organizationId}` : `user:${key.userId}`;
  const hit = planCache().get(id);
  if (hit && now.getTime() - hit.at < PLAN_CACHE_MS) return hit;
  let fresh: HolderPlan;
  if (key.organizationId) {
    const paid = planFromSubscriptions(await subscriptionRowsForOrganization(key.organizationId), now);
    fresh = { plan: paid.plan, organizationId: key.organizationId, enabled: true, at: now.getTime() };
  } else {
    const owner = await loadViewer(key.userId);
    fresh = owner
      ? { plan: owner.plan, organizationId: owner.plan === "institution" ? owner.planOrganizationId : null, enabled: true, at: now.getTime() }
      : { plan: "open", organizationId: null, enabled: false, at: now.getTime() };
  }
  planCache().set(id, fresh);
  return fresh;
}

const SESSION_COOKIE = /(?:^|;\s*)(?:__Secure-)?next-auth\.session-token(?:\.\d+)?=/;

export function anonymousCaller(req: Request): ApiCaller {
  const address = clientAddress(req.headers);
  return { kind: "anonymous", plan: "open", userId: null, organizationId: null, key: null, address, subject: `anon:${address}` };
}

function keyRefused(detail: string): AppError {
  return new AppError("invalid-api-key", { detail });
}

/** Identify the caller of a v1 request. Throws `invalid-api-key` (401) or `plan-required` (403). */
export async function identifyCaller(req: Request, now: Date = new Date()): Promise<ApiCaller> {
  const address = clientAddress(req.headers);
  const auth = parseAuthorization(req.headers.get("authorization"));
  if (auth.kind === "malformed") throw keyRefused(auth.reason);
  if (auth.kind === "bearer") {
    const key = await findActiveKey(auth.key);
    if (!key) throw keyRefused("This key is unknown or has been revoked. Make a new one on your account's API keys page.");
    const keyInfo = { id: key.id, name: key.name, prefix: key.prefix };
    const needed = PLAN_CATALOGUE[lowestPlanAllowing((l) => l.apiKeys > 0) ?? "researcher"].name;
    const holder = await holderPlan(key, now);
    if (key.organizationId) {
      if (holder.plan !== "institution")
        throw new AppError("plan-required", {
          detail: "This key belongs to an organisation whose Institution subscription is not active. Its keys work again once the subscription is.",
        });
      return { kind: "key", plan: holder.plan, userId: key.userId, organizationId: key.organizationId, key: keyInfo, address, subject: `org:${key.organizationId}` };
    }
    if (!holder.enabled) throw keyRefused("The account this key belongs to is disabled.");
    if (holder.plan === "open")
      throw new AppError("plan-required", {
        detail: `API keys work while their account is on the ${needed} or Institution plan; this key's account is on the Open plan now.`,
      });
    const org = holder.organizationId;
    return { kind: "key", plan: holder.plan, userId: key.userId, organizationId: org, key: keyInfo, address, subject: org ? `org:${org}` : `user:${key.userId}` };
  }
  // Only look for a session when the request carries next-auth's cookie (keeps anonymous calls cheap).
  if (SESSION_COOKIE.test(req.headers.get("cookie") ?? "")) {
    const viewer = await getViewer();
    if (viewer) {
      const org = viewer.plan === "institution" ? viewer.planOrganizationId : null;
      return { kind: "session", plan: viewer.plan, userId: viewer.id, organizationId: org, key: null, address, subject: org ? `org:${org}` : `user:${viewer.id}` };
    }
  }
  return anonymousCaller(req);
}
