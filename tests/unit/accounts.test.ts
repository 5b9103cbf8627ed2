import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { authTokens, batches, jobs, mailLog, memberships, organizations, reviewEvents, samples, stations, subscriptions, users } from "@/db/schema";
import { updateUser } from "@/lib/admin/users";
import { requestPasswordReset, resetPassword, signUp, verifyEmail } from "@/lib/auth/accounts";
import { checkViewer, loadViewer } from "@/lib/auth/guard";
import { verifyPassword } from "@/lib/auth/password";
import { resolvePlan } from "@/lib/auth/plan";
import { lockedForSeconds, recordFailure, THROTTLE, throttleKeys } from "@/lib/auth/throttle";
import { consumeAuthToken, createAuthToken } from "@/lib/auth/tokens";
import { countRows, freshDb } from "./helpers/db";

beforeAll(freshDb);

/** The plain token in the newest mail to `to` (the link's ?token=…). */
async function tokenFromMail(to: string): Promise<string> {
  const rows = await getDb().select().from(mailLog).where(eq(mailLog.to, to)).all();
  const last = rows.at(-1)!;
  const m = last.text.match(/token=([\w-]+)/);
  if (!m) throw new Error(`no token in mail: ${last.text}`);
  return m[1];
}

describe("sign-up, confirmation and password reset", () => {
  it("creates an unconfirmed contributor and queues a confirmation e-mail with a job", async () => {
    await signUp({ name: "Ada Rill", email: "ada@lab.example", password: "a long walk by the tarn" });
    const u = await getDb().select().from(users).where(eq(users.email, "ada@lab.example")).get();
    expect(u?.role).toBe("contributor");
    expect(u?.emailVerified).toBeNull();
    const mails = await getDb().select().from(mailLog).where(eq(mailLog.to, "ada@lab.example")).all();
    expect(mails).toHaveLength(1);
    expect(mails[0].template).toBe("verify-email");
    expect(mails[0].html).toContain("<html");
    expect(mails[0].html).not.toMatch(/<img/i);
    expect(mails[0].text).toContain("/verify?token=");
    const job = (await getDb().select().from(jobs).all()).find((j) => (j.payload as { mailId: string }).mailId === mails[0].id);
    expect(job?.kind).toBe("send-email");
    // Only the hash of the token is stored.
    const token = await tokenFromMail("ada@lab.example");
    const stored = await getDb().select().from(authTokens).all();
    expect(stored.some((t) => t.tokenHash === token)).toBe(false);
  });

  it("a second sign-up with the same address creates nothing and tells the owner", async () => {
    const before = await countRows("users");
    await signUp({ name: "Someone Else", email: "ADA@lab.example ".trim().toLowerCase(), password: "another long passphrase" });
    expect(await countRows("users")).toBe(before);
    // Unconfirmed: the owner gets a fresh confirmation link, not a new account.
    const mails = await getDb().select().from(mailLog).where(eq(mailLog.to, "ada@lab.example")).all();
    expect(mails.at(-1)?.template).toBe("verify-email");
  });

  it("confirms with the link once; a reused link says so", async () => {
    const token = await tokenFromMail("ada@lab.example");
    await verifyEmail(token);
    const u = await getDb().select().from(users).where(eq(users.email, "ada@lab.example")).get();
    expect(u?.emailVerified).toBeInstanceOf(Date);
    await expect(verifyEmail(token)).rejects.toMatchObject({ type: "link-used", status: 410 });
    // Once confirmed, a sign-up attempt with the address sends the "account exists" note.
    await signUp({ name: "X", email: "ada@lab.example", password: "another long passphrase" });
    const mails = await getDb().select().from(mailLog).where(eq(mailLog.to, "ada@lab.example")).all();
    expect(mails.at(-1)?.template).toBe("account-exists");
  });

  it("refuses an expired link and an unknown one with distinct messages", async () => {
    const u = await getDb().select().from(users).where(eq(users.email, "ada@lab.example")).get();
    const { token } = await createAuthToken(u!.id, "reset-password", { now: new Date(Date.now() - 2 * 3600_000) });
    await expect(consumeAuthToken(token, "reset-password")).rejects.toMatchObject({ type: "link-expired" });
    await expect(consumeAuthToken("x".repeat(43), "reset-password")).rejects.toMatchObject({ type: "link-invalid" });
  });

  it("resets the password with a link; the link then stops working", async () => {
    await requestPasswordReset("ada@lab.example");
    const token = await tokenFromMail("ada@lab.example");
    await expect(resetPassword({ token, password: "password123" })).rejects.toMatchObject({ status: 400 });
    await resetPassword({ token, password: "new reed bed by the spring" });
    const u = await getDb().select().from(users).where(eq(users.email, "ada@lab.example")).get();
    expect(await verifyPassword("new reed bed by the spring", u!.passwordHash!)).toBe(true);
    await expect(resetPassword({ token, password: "yet another long phrase" })).rejects.toMatchObject({ type: "link-used" });
  });

  it("asking a reset for an unknown address writes nothing", async () => {
    const mails = await countRows("mail_log");
    const tokens = await countRows("auth_tokens");
    await requestPasswordReset("nobody@lab.example");
    expect(await countRows("mail_log")).toBe(mails);
    expect(await countRows("auth_tokens")).toBe(tokens);
  });
});

describe("throttling", () => {
  it("locks an address after the limit of failures and not before", async () => {
    const keys = throttleKeys("victim@lab.example", "203.0.113.9");
    for (let i = 0; i < THROTTLE.email.limit - 1; i++) await recordFailure(keys);
    expect(await lockedForSeconds(keys)).toBe(0);
    await recordFailure(keys);
    expect(await lockedForSeconds(keys)).toBeGreaterThan(60);
  });
  it("starts a new window once the old one is over", async () => {
    const keys = throttleKeys("late@lab.example", "203.0.113.10");
    const long = Date.now() - THROTTLE.email.windowMs - 1000;
    for (let i = 0; i < THROTTLE.email.limit - 1; i++) await recordFailure(keys, long);
    await recordFailure(keys);
    expect(await lockedForSeconds(keys)).toBe(0);
  });
});

describe("guard and plans", () => {
  it("reads role and plan from the database and refuses disabled accounts", async () => {
    const db = getDb();
    const admin = await db.insert(users).values({ email: "boss@lab.example", role: "admin", emailVerified: new Date() }).returning().get();
    const u = await db.select().from(users).where(eq(users.email, "ada@lab.example")).get();
    let viewer = await loadViewer(u!.id);
    expect(viewer).toMatchObject({ role: "contributor", plan: "open", planSource: "none" });
    expect(() => checkViewer(viewer, { roles: ["moderator", "admin"] })).toThrow(expect.objectContaining({ status: 403 }));
    expect(() => checkViewer(null)).toThrow(expect.objectContaining({ status: 401 }));

    const adminViewer = (await loadViewer(admin.id))!;
    await updateUser(adminViewer, u!.id, { role: "moderator", reason: "runs the alpine stations" });
    viewer = await loadViewer(u!.id);
    expect(viewer?.role).toBe("moderator");
    const events = await db.select().from(reviewEvents).where(eq(reviewEvents.entityId, u!.id)).all();
    expect(events.find((e) => e.action === "role-changed")).toMatchObject({ actorId: admin.id, before: { role: "contributor" }, after: { role: "moderator" }, reason: "runs the alpine stations" });
    expect((await db.select().from(mailLog).where(eq(mailLog.to, "ada@lab.example")).all()).at(-1)?.template).toBe("role-changed");

    await updateUser(adminViewer, u!.id, { disabled: true });
    expect(await loadViewer(u!.id)).toBeNull();
    expect((await db.select().from(reviewEvents).where(eq(reviewEvents.entityId, u!.id)).all()).map((e) => e.action)).toContain("disabled");
    await expect(updateUser(adminViewer, admin.id, { role: "contributor" })).rejects.toMatchObject({ status: 409 });
    await updateUser(adminViewer, u!.id, { disabled: false });
  });

  it("resolves Researcher from accepted samples in the last 12 months, and Institution from an organisation", async () => {
    const db = getDb();
    const c = await db.insert(users).values({ email: "collector@lab.example", emailVerified: new Date() }).returning().get();
    expect((await resolvePlan(c.id)).plan).toBe("open");
    const st = await db.insert(stations).values({ code: "T-1", name: "Test", lat: 1, lon: 2, elevationM: 3, collectorType: "bulk-oil" }).returning().get();
    const b = await db.insert(batches).values({ contributorId: c.id, source: "form" }).returning().get();
    const sample = { batchId: b.id, stationId: st.id, startDate: "2026-01-01", endDate: "2026-02-01", d18O: -8, d2H: -54, dExcess: 10, status: "accepted" as const };
    // Accepted 13 months ago: no perk.
    await db.insert(samples).values({ ...sample, decidedAt: new Date(Date.now() - 400 * 86_400_000) });
    expect((await resolvePlan(c.id)).plan).toBe("open");
    await db.insert(samples).values({ ...sample, startDate: "2026-02-01", endDate: "2026-03-01", decidedAt: new Date(Date.now() - 30 * 86_400_000) });
    expect(await resolvePlan(c.id)).toEqual({ plan: "researcher", planSource: "contributor-perk" });

    const org = await db.insert(organizations).values({ name: "Basin Lab", slug: "basin-lab" }).returning().get();
    await db.insert(memberships).values({ organizationId: org.id, userId: c.id, role: "member" });
    await db.insert(subscriptions).values({ organizationId: org.id, plan: "institution", interval: "year", status: "canceled", stripeCustomerId: "cus_1", stripeSubscriptionId: "sub_1" });
    expect((await resolvePlan(c.id)).plan).toBe("researcher");
    await db.update(subscriptions).set({ status: "active" }).where(eq(subscriptions.stripeSubscriptionId, "sub_1"));
    expect(await resolvePlan(c.id)).toMatchObject({ plan: "institution", planSource: "organization", organizationId: org.id });
    const viewer = await loadViewer(c.id);
    expect(viewer?.organizations).toEqual([{ id: org.id, name: "Basin Lab", slug: "basin-lab", role: "member" }]);
  });
});
