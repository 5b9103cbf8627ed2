// Institution seats against the running app: an owner buys 3 seats through
// Checkout on the stand-in, invites members by e-mail up to the seat count
// (the next invitation is refused with a clear message), a member accepts and
// gets the plan, and loses it on the very next request once removed.
import { describe, expect, it } from "vitest";
import { checkoutAndPay, makeAccount, planOf, waitUntil } from "./helpers/billing";
import { signedIn } from "./helpers/http";
import { linkIn, waitForMail } from "./helpers/mailbox";

describe("Institution seats", () => {
  it("refuses invitations beyond the seat count; a removed member loses access at once", async () => {
    const owner = await makeAccount("seat-owner", "Oda Reedbank");
    const ownerSession = await signedIn(owner.email, owner.password);

    // Institution is bought for an organisation: created here, with the buyer as owner.
    const noOrg = await ownerSession.json<{ detail: string }>("/api/billing/checkout", "POST", { plan: "institution", interval: "month", seats: 3 });
    expect(noOrg.status).toBe(400);
    expect(noOrg.body.detail).toMatch(/belongs to an organisation/);
    const { organizationSlug } = await checkoutAndPay(ownerSession, {
      plan: "institution",
      interval: "month",
      seats: 3,
      organizationName: `Reedbank Survey ${Date.now().toString(36)}`,
    });
    const slug = organizationSlug!;
    await waitUntil(async () => (await planOf(ownerSession)) === "institution", "the owner's Institution plan");
    await waitForMail(owner.email, { subject: /is now on the Institution plan/ });

    const a = await makeAccount("seat-a", "Anu Sedge");
    const b = await makeAccount("seat-b", "Bram Sedge");
    const c = await makeAccount("seat-c", "Cleo Sedge");
    const invite = (email: string) => ownerSession.json<{ detail?: string; seats?: { free: number } }>(`/api/organizations/${slug}/invitations`, "POST", { email });
    const first = await invite(a.email);
    expect(first.status).toBe(201);
    expect(first.body.seats?.free).toBe(1);
    expect((await invite(b.email)).status).toBe(201);
    // Owner + two pending invitations fill the three seats.
    const third = await invite(c.email);
    expect(third.status).toBe(409);
    expect(third.body.detail).toBe(
      "All 3 seats are taken (1 member, 2 pending invitations). Add seats under Manage billing, withdraw a pending invitation or remove a member first.",
    );
    const page = await (await ownerSession.fetch(`/organizations/${slug}`)).text();
    expect(page).toContain("All 3 seats are taken");

    // A member accepts from the e-mail's link, signed in with the invited address.
    const mail = await waitForMail(a.email, { subject: /^Join Reedbank Survey/ });
    const link = new URL(linkIn(mail, "/invitations/accept"));
    const token = link.searchParams.get("token")!;
    const aSession = await signedIn(a.email, a.password);
    expect(await planOf(aSession)).toBe("open");
    const landing = await (await aSession.fetch(`${link.pathname}${link.search}`)).text();
    expect(landing).toContain("Join Reedbank Survey");
    // Someone else cannot use A's link.
    const bSession = await signedIn(b.email, b.password);
    const wrong = await bSession.json<{ detail: string }>("/api/invitations/accept", "POST", { token });
    expect(wrong.status).toBe(403);
    expect(wrong.body.detail).toMatch(/This invitation was sent to/);
    const accepted = await aSession.json<{ redirect: string }>("/api/invitations/accept", "POST", { token });
    expect(accepted.status).toBe(200);
    expect(accepted.body.redirect).toBe(`/organizations/${slug}`);
    expect(await planOf(aSession)).toBe("institution");
    expect((await aSession.fetch("/api/downloads/station-data/samples.csv?stations=NO-SUCH")).status).toBe(200);

    // Removed: the next request of the same session is already on Open.
    const removed = await ownerSession.fetch(`/api/organizations/${slug}/members/${a.id}`, { method: "DELETE" });
    expect(removed.status).toBe(200);
    expect(await planOf(aSession)).toBe("open");
    const refused = await aSession.json<{ code: string }>("/api/downloads/station-data/samples.csv?stations=NO-SUCH", "GET");
    expect(refused.status).toBe(403);
    expect(refused.body.code).toBe("plan-required");
    expect((await aSession.fetch(`/organizations/${slug}`)).status).toBe(404);
  });
});
