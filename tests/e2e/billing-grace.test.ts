// A failed renewal against the running app: the stand-in declines the card,
// the webhook puts the subscription in its grace period — a site-wide banner
// and an e-mail naming the grace end — and when the stand-in's retries run out
// the subscription ends and the account drops to Open.
import { describe, expect, it } from "vitest";
import { checkoutAndPay, customerOf, makeAccount, planOf, standin, waitUntil } from "./helpers/billing";
import { signedIn } from "./helpers/http";
import { waitForMail } from "./helpers/mailbox";

describe("a failed payment", () => {
  it("gives a grace banner and an e-mail, then drops the account to Open", async () => {
    const person = await makeAccount("grace", "Tove Marram");
    const session = await signedIn(person.email, person.password);
    await checkoutAndPay(session, { plan: "researcher", interval: "month" });
    await waitUntil(async () => (await planOf(session)) === "researcher", "the Researcher plan");
    const home = async () => (await session.fetch("/")).text();
    expect(await home()).not.toContain('data-testid="billing-banner"');

    await standin("/payments/decline", { customer: await customerOf(person.id), attempts: "always" });
    await standin("/clock", { advance_days: 32 }); // the renewal fails

    const mail = await waitForMail(person.email, { subject: /^Action needed: a payment of €19\.00 for Rainprint Researcher failed$/ });
    const grace = /keeps working until (\d{1,2} \w+ \d{4})/.exec(mail.text ?? "")?.[1];
    expect(grace).toBeTruthy();
    // Still Researcher during the grace period, with the banner on every page.
    expect(await planOf(session)).toBe("researcher");
    await waitUntil(async () => (await home()).includes('data-kind="payment-failed"'), "the grace banner");
    const page = await home();
    expect(page).toContain("A payment failed.");
    expect(page).toContain(grace!);
    expect(page).toContain("to the free Open plan (no downloads, batch lookups or API keys)");
    const billing = await (await session.fetch("/account/billing")).text();
    expect(billing).toContain("A payment failed");
    expect(billing).toContain(grace!);

    // The stand-in retries 3, 5 and 7 days apart, then cancels: the account is on Open.
    await standin("/clock", { advance_days: 16 });
    await waitUntil(async () => (await planOf(session)) === "open", "the drop to Open");
    await waitForMail(person.email, { subject: /^Your Researcher plan has ended$/ });
    expect(await home()).not.toContain('data-testid="billing-banner"');
  });
});
