// The authorization policy: for every page and route handler under app/,
// an example request and what each kind of visitor must get back. The matrix
// test (authorization-matrix.test.ts) discovers the files from the file
// system and fails when one has no entry here, or when any outcome differs.
//
// To add a route: add one entry (or one per method) with a rule below.
// To add a plan dimension (billing): add principals such as
//   researcher: { account: "researcher", role: "contributor", plan: "researcher" }
// to PRINCIPALS and a `plans(...)` rule; entries built from rules get the new
// column without being edited.

import type { Plan, Role } from "../../db/schema";
import type { DemoKey } from "./helpers/accounts";

/** Who asks: anonymous, or a demo account with the role and plan it is expected to have. */
export const PRINCIPALS = {
  anonymous: null,
  // The newcomer has no accepted samples, so no contributor perk: a plain contributor on Open.
  contributor: { account: "newcomer", role: "contributor", plan: "open" },
  moderator: { account: "moderator", role: "moderator", plan: "open" },
  admin: { account: "admin", role: "admin", plan: "open" },
  // The station operator has accepted samples from the last 12 months: Researcher through the contributor perk.
  perk: { account: "contributor", role: "contributor", plan: "researcher" },
  // Plan as a dimension: demo subscriptions created through the payments stand-in (scripts/seed-billing.ts).
  researcher: { account: "researcher", role: "contributor", plan: "researcher" },
  // Owner of the lakeshore-basin organisation, whose Institution subscription gives them a seat.
  institution: { account: "institution", role: "contributor", plan: "institution" },
} as const satisfies Record<string, { account: DemoKey; role: Role; plan: Plan } | null>;

export type Principal = keyof typeof PRINCIPALS;

/** An HTTP status, or a redirect whose Location path starts with `redirect`. */
export type Outcome = number | { redirect: string };
export const SIGN_IN: Outcome = { redirect: "/sign-in" };

export type Expectations = Record<Principal, Outcome>;

export type PolicyEntry = {
  /** Route file, relative to the repository root. */
  file: string;
  /** Example URL (dynamic segments filled in). */
  url: string;
  method?: "GET" | "POST" | "PATCH" | "PUT" | "DELETE";
  /** JSON body to send (chosen so no test changes state). */
  body?: unknown;
  expect: Expectations;
  note?: string;
};

type Who = { role: Role; plan: Plan } | null;
const each = (f: (who: Who) => Outcome): Expectations =>
  Object.fromEntries(Object.entries(PRINCIPALS).map(([k, v]) => [k, f(v)])) as Expectations;

// Rules for pages (signed-out visitors are sent to sign-in) …
export const page = {
  open: (): Expectations => each(() => 200),
  signedIn: (): Expectations => each((w) => (w ? 200 : SIGN_IN)),
  roles: (roles: readonly Role[]): Expectations => each((w) => (!w ? SIGN_IN : roles.includes(w.role) ? 200 : 403)),
  /** Only for visitors who are signed out; signed-in visitors are sent on to `to`. */
  signedOutOnly: (to: string): Expectations => each((w) => (w ? { redirect: to } : 200)),
  /** Signed-in visitors on one of `plans` (plan-gated pages answer 403 to the others). */
  plans: (plans: readonly Plan[]): Expectations => each((w) => (!w ? SIGN_IN : plans.includes(w.plan) ? 200 : 403)),
};

// … and for route handlers (signed-out callers get 401).
export const api = {
  open: (status = 200): Expectations => each(() => status),
  signedIn: (status = 200): Expectations => each((w) => (w ? status : 401)),
  roles: (roles: readonly Role[], status = 200): Expectations => each((w) => (!w ? 401 : roles.includes(w.role) ? status : 403)),
  /** Signed-in callers on one of `plans` get `status`; other plans 403; signed out 401. */
  plans: (plans: readonly Plan[], status = 200): Expectations => each((w) => (!w ? 401 : plans.includes(w.plan) ? status : 403)),
};

// Demo ids for the intake rows: stations RP-EUR-001…004 and the queued batch "queued-1" belong to the
// demo contributor (the `perk` column); ids come from db/seed/demo-data.ts demoId().
const OWN_STATION = "RP-EUR-001";
const OWN_BATCH = "5553a57a-f273-5018-8506-a537b8397106"; // demoId("batch:queued-1")
const OWN_PENDING_SAMPLE = "e6d35576-8cf5-5dc1-8716-e278dd12ba8b"; // demoId("sample:RP-EUR-001:2026-07-01"), pending in queued-1
/** Only the owner (perk) and moderators/admins see it; other contributors get 404 (existence not revealed). */
const ownerOrModerator = (e: Expectations): Expectations => ({ ...e, contributor: 404, researcher: 404, institution: 404 });

/** Plans that include downloads (station data and edition surfaces), as the catalogue says. */
const DOWNLOAD_PLANS: readonly Plan[] = ["researcher", "institution"];

export const POLICY: PolicyEntry[] = [
  // ── public pages ──
  { file: "app/page.tsx", url: "/", expect: page.open() },
  { file: "app/map/page.tsx", url: "/map", expect: page.open(), note: "the public map of the current edition" },
  { file: "app/sign-in/page.tsx", url: "/sign-in", expect: page.signedOutOnly("/account") },
  { file: "app/sign-in/check-email/page.tsx", url: "/sign-in/check-email", expect: page.open() },
  { file: "app/sign-up/page.tsx", url: "/sign-up", expect: page.open() },
  { file: "app/sign-out/page.tsx", url: "/sign-out", expect: page.open() },
  { file: "app/verify/page.tsx", url: "/verify", expect: page.open() },
  { file: "app/verify/resend/page.tsx", url: "/verify/resend", expect: page.open() },
  { file: "app/reset-password/page.tsx", url: "/reset-password", expect: page.open() },
  { file: "app/reset-password/new/page.tsx", url: "/reset-password/new?token=not-a-real-token-000000", expect: page.open() },
  { file: "app/problems/[type]/page.tsx", url: "/problems/forbidden", expect: page.open() },
  { file: "app/api/page.tsx", url: "/api", expect: page.open() },
  { file: "app/pricing/page.tsx", url: "/pricing", expect: page.open() },
  { file: "app/pricing/cancelled/page.tsx", url: "/pricing/cancelled", expect: page.open() },
  { file: "app/downloads/page.tsx", url: "/downloads", expect: page.open(), note: "public; the download buttons appear only for plans that include them" },
  { file: "app/editions/page.tsx", url: "/editions", expect: page.open() },
  { file: "app/editions/[id]/page.tsx", url: "/editions/current", expect: page.open(), note: "published and withdrawn editions are public; unpublished builds only for moderators (404 to others)" },
  { file: "app/invitations/accept/page.tsx", url: "/invitations/accept?token=not-a-real-invitation-token", expect: page.open(), note: "shows that the link is not valid" },
  { file: "app/lookup/page.tsx", url: "/lookup", expect: page.open(), note: "the form; a lookup counts against the Open plan's daily cap" },
  { file: "app/lookup/report/page.tsx", url: "/lookup/report?lat=91&lon=7", expect: page.open(), note: "bad coordinates show the form with the message and count nothing" },
  { file: "app/lookup/batch/page.tsx", url: "/lookup/batch", expect: page.open(), note: "states each plan's batch limit; the upload form only for plans that include batch lookups" },
  { file: "app/dev/mailbox/page.tsx", url: "/dev/mailbox", expect: page.open(), note: "present while the mail stand-in is configured (always in tests)" },

  // ── signed-in pages ──
  { file: "app/account/page.tsx", url: "/account", expect: page.signedIn() },
  {
    file: "app/organizations/[slug]/page.tsx",
    url: "/organizations/lakeshore-basin",
    expect: { ...page.roles(["admin"]), contributor: 404, moderator: 404, researcher: 404, institution: 200, perk: 404 },
    note: "members (the institution demo account owns it) and admins only; others get 404 so the organisation's existence is not revealed",
  },
  { file: "app/account/billing/page.tsx", url: "/account/billing", expect: page.signedIn() },
  {
    file: "app/pricing/success/page.tsx",
    url: "/pricing/success?session=cs_test_not_a_session",
    expect: page.signedIn(),
    note: "a checkout that is not the viewer's shows 'not found' text, never another person's plan",
  },
  { file: "app/jobs/page.tsx", url: "/jobs", expect: page.roles(["moderator", "admin"]) },
  { file: "app/editions/builds/page.tsx", url: "/editions/builds", expect: page.roles(["moderator", "admin"]) },
  { file: "app/account/api-keys/page.tsx", url: "/account/api-keys", expect: page.signedIn(), note: "Open accounts see why they cannot make keys" },
  { file: "app/account/usage/page.tsx", url: "/account/usage", expect: page.signedIn() },
  { file: "app/admin/users/page.tsx", url: "/admin/users", expect: page.roles(["admin"]) },
  { file: "app/admin/elevation/page.tsx", url: "/admin/elevation", expect: page.roles(["admin"]) },

  // ── route handlers ──
  { file: "app/api/health/route.ts", url: "/api/health", expect: api.open() },
  // ── the map: tiles and map data, public; "current" names the newest published edition ──
  {
    file: "app/api/tiles/[edition]/[variable]/[period]/[z]/[x]/[y]/route.ts",
    url: "/api/tiles/current/d18O/0/0/0/0.png",
    expect: api.open(302),
    note: "public; “current” redirects to the edition's immutable tile address",
  },
  { file: "app/api/map/legend/route.ts", url: "/api/map/legend?edition=current&layer=d18O&period=0", expect: api.open() },
  { file: "app/api/map/stations/route.ts", url: "/api/map/stations?edition=current&period=0", expect: api.open() },
  { file: "app/api/map/readout/route.ts", url: "/api/map/readout?edition=current&period=0&lat=47.4&lon=8.5", expect: api.open() },
  { file: "app/api/map/land/route.ts", url: "/api/map/land", expect: api.open() },
  { file: "app/api/auth/[...nextauth]/route.ts", url: "/api/auth/session", expect: api.open() },
  { file: "app/api/auth/[...nextauth]/route.ts", url: "/api/auth/signin/email", method: "POST", body: {}, expect: api.open(302), note: "without a CSRF token next-auth redirects back to sign-in" },
  { file: "app/api/account/sign-up/route.ts", url: "/api/account/sign-up", method: "POST", body: {}, expect: api.open(400) },
  { file: "app/api/account/verify/route.ts", url: "/api/account/verify", method: "POST", body: {}, expect: api.open(400) },
  { file: "app/api/account/resend-verification/route.ts", url: "/api/account/resend-verification", method: "POST", body: {}, expect: api.open(400) },
  { file: "app/api/account/password-reset/route.ts", url: "/api/account/password-reset", method: "POST", body: {}, expect: api.open(400) },
  { file: "app/api/account/password-reset/confirm/route.ts", url: "/api/account/password-reset/confirm", method: "POST", body: {}, expect: api.open(400) },
  { file: "app/api/account/password/route.ts", url: "/api/account/password", method: "POST", body: {}, expect: api.signedIn(400) },
  { file: "app/api/account/profile/route.ts", url: "/api/account/profile", method: "PATCH", body: {}, expect: api.signedIn(400) },
  { file: "app/api/me/route.ts", url: "/api/me", expect: api.signedIn(200) },
  { file: "app/api/admin/users/route.ts", url: "/api/admin/users", expect: api.roles(["admin"]) },
  { file: "app/api/admin/elevation/route.ts", url: "/api/admin/elevation?name=x", method: "POST", expect: api.roles(["admin"], 400), note: "an empty body is not a GeoTIFF: 400, nothing stored" },
  { file: "app/api/admin/elevation/[id]/route.ts", url: "/api/admin/elevation/no-such-model", method: "PATCH", body: { active: true }, expect: api.roles(["admin"], 404) },
  { file: "app/api/admin/users/[id]/route.ts", url: "/api/admin/users/no-such-user", method: "PATCH", body: {}, expect: api.roles(["admin"], 400) },
  {
    file: "app/api/stripe/webhook/route.ts",
    url: "/api/stripe/webhook",
    method: "POST",
    body: {},
    expect: api.open(400),
    note: "who is asking is proven by Stripe's signature, not a session; unsigned → 400",
  },
  // ── billing, seats and downloads ──
  { file: "app/api/billing/checkout/route.ts", url: "/api/billing/checkout", method: "POST", body: {}, expect: api.signedIn(400) },
  {
    file: "app/api/billing/portal/route.ts",
    url: "/api/billing/portal",
    method: "POST",
    body: { organizationId: "no-such-organization" },
    expect: api.signedIn(404),
    note: "only an organisation the viewer owns; nobody owns this one",
  },
  { file: "app/api/organizations/[slug]/invitations/route.ts", url: "/api/organizations/lakeshore-basin/invitations", method: "POST", body: {}, expect: api.signedIn(400) },
  {
    file: "app/api/organizations/[slug]/invitations/[id]/route.ts",
    url: "/api/organizations/lakeshore-basin/invitations/no-such-invitation",
    method: "DELETE",
    expect: api.signedIn(404),
    note: "non-members: the organisation is not revealed; its owner: no such invitation",
  },
  {
    file: "app/api/organizations/[slug]/members/[userId]/route.ts",
    url: "/api/organizations/lakeshore-basin/members/no-such-user",
    method: "DELETE",
    expect: api.signedIn(404),
    note: "non-members: the organisation is not revealed; its owner: no such member",
  },
  { file: "app/api/invitations/accept/route.ts", url: "/api/invitations/accept", method: "POST", body: {}, expect: api.signedIn(400) },
  {
    file: "app/api/downloads/station-data/[file]/route.ts",
    url: "/api/downloads/station-data/samples.csv?stations=NO-SUCH-STATION",
    expect: api.plans(DOWNLOAD_PLANS),
    note: "plan-gated (lib/downloads/access.ts): Open → 403 plan-required naming Researcher",
  },
  {
    file: "app/api/downloads/editions/[edition]/[file]/route.ts",
    url: "/api/downloads/editions/no-such-edition/d18O-annual.tif",
    expect: api.plans(DOWNLOAD_PLANS, 404),
    note: "plan checked before the edition is looked up: Open → 403, paid plans → 404 for an unknown edition",
  },
  { file: "app/api/jobs/[id]/cancel/route.ts", url: "/api/jobs/no-such-job/cancel", method: "POST", expect: api.roles(["moderator", "admin"], 404) },
  // ── edition builds (moderators) ──
  { file: "app/api/editions/builds/route.ts", url: "/api/editions/builds", method: "POST", body: { resolutionDeg: 0 }, expect: api.roles(["moderator", "admin"], 400), note: "a cell size of 0 is refused, so nothing is built" },
  { file: "app/api/editions/[id]/cancel/route.ts", url: "/api/editions/no-such-edition/cancel", method: "POST", expect: api.roles(["moderator", "admin"], 404) },
  { file: "app/api/editions/[id]/resume/route.ts", url: "/api/editions/no-such-edition/resume", method: "POST", expect: api.roles(["moderator", "admin"], 404) },
  { file: "app/api/editions/[id]/publish/route.ts", url: "/api/editions/no-such-edition/publish", method: "POST", expect: api.roles(["moderator", "admin"], 404) },
  { file: "app/api/editions/[id]/status/route.ts", url: "/api/editions/no-such-edition/status", expect: api.roles(["moderator", "admin"], 404) },

  // ── API keys (the account's keys page calls these) ──
  { file: "app/api/account/api-keys/route.ts", url: "/api/account/api-keys", expect: api.signedIn(200) },
  { file: "app/api/account/api-keys/route.ts", url: "/api/account/api-keys", method: "POST", body: {}, expect: api.plans(["researcher", "institution"], 400), note: "plan checked before the body: Open 403, paid plans 400 for a missing name" },
  { file: "app/api/account/api-keys/[id]/route.ts", url: "/api/account/api-keys/no-such-key", method: "DELETE", expect: api.signedIn(404), note: "any plan may revoke its own keys" },

  // ── intake: stations, batches, review desk ──
  { file: "app/contribute/page.tsx", url: "/contribute", expect: page.signedIn() },
  { file: "app/contribute/stations/new/page.tsx", url: "/contribute/stations/new", expect: page.signedIn() },
  { file: "app/contribute/stations/[code]/page.tsx", url: `/contribute/stations/${OWN_STATION}`, expect: ownerOrModerator(page.signedIn()), note: "owner and moderators; other contributors 404" },
  { file: "app/contribute/batches/new/page.tsx", url: "/contribute/batches/new", expect: page.signedIn() },
  { file: "app/contribute/batches/[id]/page.tsx", url: `/contribute/batches/${OWN_BATCH}`, expect: ownerOrModerator(page.signedIn()), note: "owner and moderators; other contributors 404" },
  { file: "app/review/page.tsx", url: "/review", expect: page.roles(["moderator", "admin"]) },
  { file: "app/review/batches/[id]/page.tsx", url: `/review/batches/${OWN_BATCH}`, expect: page.roles(["moderator", "admin"]) },
  { file: "app/stations/[code]/page.tsx", url: `/stations/${OWN_STATION}`, expect: page.open(), note: "public page of an approved station" },
  { file: "app/api/stations/route.ts", url: "/api/stations", expect: api.signedIn(200), note: "only the viewer's own stations" },
  { file: "app/api/stations/route.ts", url: "/api/stations?status=pending", expect: { ...api.signedIn(403), moderator: 200, admin: 200 }, note: "every pending station: moderators only" },
  { file: "app/api/stations/route.ts", url: "/api/stations", method: "POST", body: {}, expect: api.signedIn(400) },
  { file: "app/api/stations/[code]/route.ts", url: `/api/stations/${OWN_STATION}`, expect: ownerOrModerator(api.signedIn(200)) },
  {
    file: "app/api/stations/[code]/route.ts",
    url: `/api/stations/${OWN_STATION}`,
    method: "PATCH",
    body: { code: OWN_STATION, name: "Unchanged", lat: 46.4, lon: 17.05, elevationM: 240, collectorType: "wet-only", samplingInterval: "monthly", rowVersion: 1 },
    expect: { ...api.signedIn(404), perk: 409 },
    note: "owner only (moderators too get 404); the owner's station is approved, not returned → 409, nothing changes",
  },
  { file: "app/api/stations/[code]/decision/route.ts", url: `/api/stations/${OWN_STATION}/decision`, method: "POST", body: {}, expect: api.roles(["moderator", "admin"], 400) },
  { file: "app/api/stations/[code]/water-line/route.ts", url: `/api/stations/${OWN_STATION}/water-line?method=rma`, expect: api.open() },
  { file: "app/api/batches/route.ts", url: "/api/batches", expect: api.signedIn(200), note: "only the viewer's own batches" },
  { file: "app/api/batches/route.ts", url: "/api/batches", method: "POST", body: {}, expect: api.signedIn(400) },
  { file: "app/api/batches/preview/route.ts", url: "/api/batches/preview", method: "POST", body: {}, expect: api.signedIn(400) },
  { file: "app/api/batches/preview-csv/route.ts", url: "/api/batches/preview-csv", method: "POST", body: {}, expect: api.signedIn(400), note: "a body that is not a sample file → 400 with the reason" },
  { file: "app/api/batches/[id]/route.ts", url: `/api/batches/${OWN_BATCH}`, expect: ownerOrModerator(api.signedIn(200)) },
  {
    file: "app/api/samples/[id]/resubmit/route.ts",
    url: `/api/samples/${OWN_PENDING_SAMPLE}/resubmit`,
    method: "POST",
    body: { cells: {}, rowVersion: 1 },
    expect: { ...api.signedIn(404), perk: 409 },
    note: "owner only (moderators too get 404); the owner's sample is pending, not returned → 409, nothing changes",
  },
  { file: "app/api/review/queue/route.ts", url: "/api/review/queue?sort=severity&dir=desc", expect: api.roles(["moderator", "admin"]) },
  { file: "app/api/review/decisions/route.ts", url: "/api/review/decisions", method: "POST", body: {}, expect: api.roles(["moderator", "admin"], 400) },
  { file: "app/api/review/batches/[id]/accept-clean/route.ts", url: `/api/review/batches/${OWN_BATCH}/accept-clean`, method: "POST", body: {}, expect: api.roles(["moderator", "admin"], 400) },
  { file: "app/api/intake/template/route.ts", url: "/api/intake/template", expect: api.open() },

  // ── public API v1 (anonymous callers are on Open; the perk column is a paid plan through a session) ──
  { file: "app/api/v1/route.ts", url: "/api/v1", expect: api.open() },
  { file: "app/api/v1/openapi.json/route.ts", url: "/api/v1/openapi.json", expect: api.open() },
  { file: "app/api/v1/predict/route.ts", url: "/api/v1/predict?lat=91&lon=7", expect: api.open(400), note: "public; latitude 91 is refused before the edition is read (counts nothing)" },
  {
    file: "app/api/v1/predict/route.ts",
    url: "/api/v1/predict",
    method: "POST",
    body: { sites: [] },
    expect: api.plans(["researcher", "institution"], 400),
    note: "batch lookups: plan checked before the body; an empty batch is a 400",
  },
  {
    file: "app/api/lookup/batch/route.ts",
    url: "/api/lookup/batch",
    method: "POST",
    body: {},
    expect: api.plans(["researcher", "institution"], 400),
    note: "the batch page's upload: plans with batch lookups; a body without a file is a 400",
  },
  { file: "app/api/v1/stations/route.ts", url: "/api/v1/stations?limit=5", expect: api.open() },
  { file: "app/api/v1/stations/[code]/route.ts", url: "/api/v1/stations/RP-EUR-001", expect: api.open() },
  { file: "app/api/v1/editions/route.ts", url: "/api/v1/editions", expect: api.open() },
  { file: "app/api/v1/editions/[id]/route.ts", url: "/api/v1/editions/current", expect: api.open() },
  {
    file: "app/api/v1/stations/[code]/samples/route.ts",
    url: "/api/v1/stations/RP-EUR-001/samples?limit=5",
    expect: api.plans(["researcher", "institution"]),
    note: "accepted samples: paid plans; Open gets 403 plan-required naming Researcher",
  },
];
