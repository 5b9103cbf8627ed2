import http from "node:http";
import { describe, expect, inject, it } from "vitest";
import { demoAccount, freshEmail } from "./helpers/accounts";
import { testDb, snapshotCounts } from "./helpers/db";
import { HttpSession, signIn } from "./helpers/http";
import { linkIn, listMail, waitForMail } from "./helpers/mailbox";

// Bad input gets a clear message and changes nothing.

type Problem = { type: string; code: string; title: string; detail?: string; errors?: Record<string, string[]> };

const anon = () => new HttpSession();

/** POST `chunks` × `size` bytes with Transfer-Encoding: chunked on a socket of its own; returns the status. */
function postChunked(path: string, chunks: number, size: number): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.request(new URL(path, inject("baseUrl")), { method: "POST", agent: false, headers: { "content-type": "application/json" } }, (res) => {
      res.resume();
      resolve(res.statusCode ?? 0);
    });
    req.on("error", (e) => ((e as NodeJS.ErrnoException).code === "ECONNRESET" || (e as NodeJS.ErrnoException).code === "EPIPE" ? undefined : reject(e)));
    for (let i = 0; i < chunks; i++) req.write("x".repeat(size));
    req.end();
  });
}

async function signUpAndConfirm(email: string, password: string) {
  const res = await anon().json("/api/account/sign-up", "POST", { name: "Test Person", email, password });
  expect(res.status).toBe(202);
  const mail = await waitForMail(email, { subject: /Confirm/ });
  const token = new URL(linkIn(mail, "/verify")).searchParams.get("token");
  expect((await anon().json("/api/account/verify", "POST", { token })).status).toBe(200);
}

describe("sign-up input", () => {
  it("a malformed e-mail address → 400 naming the field, nothing written", async () => {
    const before = await snapshotCounts();
    const res = await anon().json<Problem>("/api/account/sign-up", "POST", { name: "A", email: "not-an-address", password: "long enough passphrase" });
    expect(res.status).toBe(400);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(res.body.code).toBe("invalid-input");
    expect(res.body.errors?.email?.[0]).toMatch(/valid e-mail/);
    expect(await snapshotCounts()).toEqual(before);
  });

  it("a weak password → 400 with the reason, nothing written", async () => {
    const before = await snapshotCounts();
    for (const password of ["short", "password123", "aaaaaaaaaaaa"]) {
      const res = await anon().json<Problem>("/api/account/sign-up", "POST", { name: "A", email: freshEmail("weak"), password });
      expect(res.status, password).toBe(400);
      expect(res.body.errors?.password?.[0], password).toBeTruthy();
    }
    expect(await snapshotCounts()).toEqual(before);
  });

  it("a duplicate account gets the same answer as a new one, and no account is created", async () => {
    const existing = demoAccount("contributor").email;
    const dupe = await anon().json<{ message: string }>("/api/account/sign-up", "POST", { name: "Copy Cat", email: existing, password: "a different long phrase" });
    const fresh = await anon().json<{ message: string }>("/api/account/sign-up", "POST", { name: "New Person", email: freshEmail("new"), password: "a different long phrase" });
    expect(dupe.status).toBe(fresh.status);
    expect(dupe.body).toEqual(fresh.body);
    const rows = await testDb().execute({ sql: "SELECT count(*) AS n FROM users WHERE email = ?", args: [existing] });
    expect(Number(rows.rows[0].n)).toBe(1);
    // The owner is told by e-mail instead.
    await waitForMail(existing, { subject: /already have a Rainprint account/ });
  });

  it("an oversized body → 413 with a clear message, nothing written", async () => {
    const before = await snapshotCounts();
    const big = { name: "x".repeat(200_000), email: freshEmail("big"), password: "long enough passphrase" };
    const res = await anon().json<Problem>("/api/account/sign-up", "POST", big);
    expect(res.status).toBe(413);
    expect(res.body.code).toBe("body-too-large");
    expect(res.body.detail).toMatch(/larger than the 64 KB/);

    // The same without a Content-Length (chunked), counted while reading.
    expect(await postChunked("/api/account/sign-up", 40, 4096)).toBe(413);

    // next-auth's own endpoints are limited too.
    const auth = await anon().fetch("/api/auth/callback/credentials", {
      method: "POST",
      headers: { "content-type": "application/x-www-form-urlencoded" },
      body: `email=a%40b.example&password=${"x".repeat(40_000)}`,
    });
    expect(auth.status).toBe(413);
    expect(await snapshotCounts()).toEqual(before);
  });

  it("a body that is not JSON → 400, and a cross-site form post → 403", async () => {
    const res = await anon().fetch("/api/account/sign-up", { method: "POST", headers: { "content-type": "application/json" }, body: "{not json" });
    expect(res.status).toBe(400);
    expect(((await res.json()) as Problem).code).toBe("malformed-body");
    const cross = await anon().fetch("/api/account/password-reset", {
      method: "POST",
      headers: { "content-type": "application/x-www-form-urlencoded", origin: "https://elsewhere.example" },
      body: "email=a%40b.example",
    });
    expect(cross.status).toBe(403);
  });
});

describe("one-time links", () => {
  it("a reused confirmation link and an expired one say so clearly", async () => {
    const email = freshEmail("links");
    await anon().json("/api/account/sign-up", "POST", { name: "Link Tester", email, password: "moss on the weir stones" });
    const token = new URL(linkIn(await waitForMail(email, { subject: /Confirm/ }), "/verify")).searchParams.get("token");
    expect((await anon().json("/api/account/verify", "POST", { token })).status).toBe(200);
    const again = await anon().json<Problem>("/api/account/verify", "POST", { token });
    expect(again.status).toBe(410);
    expect(again.body.code).toBe("link-used");
    expect(again.body.detail).toMatch(/already been used/);

    // Expired: ask for a reset link, then move its expiry into the past.
    const seen = (await listMail(email)).map((m) => m.id);
    expect((await anon().json("/api/account/password-reset", "POST", { email })).status).toBe(202);
    const reset = await waitForMail(email, { subject: /new Rainprint password/, seen });
    const resetLink = linkIn(reset, "/reset-password/new");
    await testDb().execute({ sql: "UPDATE auth_tokens SET expires_at = ? WHERE purpose = 'reset-password' AND used_at IS NULL", args: [Date.now() - 1000] });
    const expired = await anon().json<Problem>("/api/account/password-reset/confirm", "POST", { token: new URL(resetLink).searchParams.get("token"), password: "a brand new passphrase" });
    expect(expired.status).toBe(410);
    expect(expired.body.code).toBe("link-expired");
    const page = await anon().fetch(new URL(resetLink).pathname + new URL(resetLink).search);
    expect(await page.text()).toContain("This link has expired");
    // The old password still works: nothing changed.
    expect(await signIn(new HttpSession(), email, "moss on the weir stones")).toBeNull();
  });
});

describe("signing in", () => {
  it("a wrong password and an unknown address get the same generic answer and no session", async () => {
    const c = demoAccount("newcomer");
    const s1 = new HttpSession();
    const s2 = new HttpSession();
    expect(await signIn(s1, c.email, "not the password at all")).toBe("invalid");
    expect(await signIn(s2, freshEmail("ghost"), "not the password at all")).toBe("invalid");
    expect(s1.hasCookie("next-auth.session-token")).toBe(false);
    expect((await s1.json("/api/me", "GET")).status).toBe(401);
  });

  it("repeated failures lock the address for a while, even for the right password", async () => {
    const email = freshEmail("throttle");
    const password = "lichen on the granite";
    await signUpAndConfirm(email, password);
    for (let i = 0; i < 5; i++) expect(await signIn(new HttpSession(), email, `wrong guess ${i}`)).toBe("invalid");
    expect(await signIn(new HttpSession(), email, password)).toBe("throttled");
    const rows = await testDb().execute({ sql: "SELECT locked_until FROM auth_throttle WHERE key = ?", args: [`email:${email}`] });
    expect(Number(rows.rows[0].locked_until)).toBeGreaterThan(Date.now());
  });
});
