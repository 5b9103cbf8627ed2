import { describe, expect, it } from "vitest";
import { demoAccount, freshEmail } from "./helpers/accounts";
import { countRows, testDb } from "./helpers/db";
import { HttpSession, signedIn } from "./helpers/http";
import { linkIn, listMail, waitForMail } from "./helpers/mailbox";

async function requestMagicLink(email: string): Promise<Response> {
  const s = new HttpSession();
  const csrf = await s.json<{ csrfToken: string }>("/api/auth/csrf", "GET");
  return s.fetch("/api/auth/signin/email", {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ csrfToken: csrf.body.csrfToken, email, json: "true", callbackUrl: "/account" }),
  });
}

describe("magic links", () => {
  it("an existing account gets a link that signs it in once", async () => {
    const mod = demoAccount("moderator");
    const seen = (await listMail(mod.email)).map((m) => m.id);
    const res = await requestMagicLink(mod.email);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { url: string };
    expect(new URL(body.url).pathname).toBe("/api/auth/verify-request");
    // …which sends the browser to our neutral "check your e-mail" page.
    const page = await new HttpSession().fetch(new URL(body.url).pathname + new URL(body.url).search);
    expect(new URL(page.headers.get("location")!, "http://x").pathname).toBe("/sign-in/check-email");
    const mail = await waitForMail(mod.email, { subject: /sign-in link/, seen });
    const link = linkIn(mail, "/api/auth/callback/email");

    const s = new HttpSession();
    const cb = await s.fetch(link);
    expect(cb.status).toBe(302);
    expect(new URL(cb.headers.get("location")!, s.baseUrl).pathname).toBe("/account");
    const me = await s.json<{ email: string; role: string }>("/api/me", "GET");
    expect(me.body).toMatchObject({ email: mod.email, role: "moderator" });

    // The same link a second time: refused, no session.
    const s2 = new HttpSession();
    const again = await s2.fetch(link);
    expect(new URL(again.headers.get("location")!, s2.baseUrl).searchParams.get("error")).toBe("Verification");
    expect((await s2.json("/api/me", "GET")).status).toBe(401);
  });

  it("an unknown address gets the same answer, no e-mail and no account", async () => {
    const email = freshEmail("nobody");
    const users = await countRows("users");
    const res = await requestMagicLink(email);
    expect(res.status).toBe(200);
    // Word for word the answer an existing account gets.
    expect(new URL(((await res.json()) as { url: string }).url).pathname).toBe("/api/auth/verify-request");
    await new Promise((r) => setTimeout(r, 2500));
    expect(await listMail(email)).toEqual([]);
    expect(await countRows("users")).toBe(users);
  });
});

describe("administration", () => {
  it("an admin changes a role: audited, e-mailed, effective on the next request", async () => {
    const admin = await signedIn(demoAccount("admin").email, demoAccount("admin").password);
    const email = freshEmail("promoted");
    const password = "heather on the far ridge";
    await new HttpSession().json("/api/account/sign-up", "POST", { name: "Promoted Person", email, password });
    const token = new URL(linkIn(await waitForMail(email, { subject: /Confirm/ }), "/verify")).searchParams.get("token");
    await new HttpSession().json("/api/account/verify", "POST", { token });
    const person = await signedIn(email, password);
    expect((await person.fetch("/jobs")).status).toBe(403);

    const list = await admin.json<{ rows: { id: string; email: string }[] }>(`/api/admin/users?q=${encodeURIComponent(email)}`, "GET");
    expect(list.body.rows).toHaveLength(1);
    const id = list.body.rows[0].id;
    const res = await admin.json(`/api/admin/users/${id}`, "PATCH", { role: "moderator", reason: "joins the review desk" });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ role: "moderator" });

    // Same session cookie, new role: the guard reads the database.
    expect((await person.fetch("/jobs")).status).toBe(200);
    const audit = await testDb().execute({ sql: "SELECT action, before, after, reason FROM review_events WHERE entity_id = ?", args: [id] });
    expect(audit.rows.map((r) => r.action)).toContain("role-changed");
    await waitForMail(email, { subject: /role is now moderator/ });

    // Disabled: refused at once, with the same cookie.
    expect((await admin.json(`/api/admin/users/${id}`, "PATCH", { disabled: true })).status).toBe(200);
    expect((await person.json("/api/me", "GET")).status).toBe(401);
    expect((await person.fetch("/jobs")).status).toBe(307);

    // Bad input to the admin route: clear message, nothing changed.
    const bad = await admin.json<{ errors: Record<string, string[]> }>(`/api/admin/users/${id}`, "PATCH", { role: "superuser" });
    expect(bad.status).toBe(400);
    expect(bad.body.errors.role[0]).toMatch(/contributor, moderator or admin/);
  });
});
