// Organisations, seats and invitations (lib/organizations.ts) with the plan
// the guard resolves (lib/auth/plan.ts): inviting beyond the seat count is
// refused, an accepted invitation gives a seat, a removed member loses the
// plan on the next read, and fewer seats than members takes the plan from the
// members who joined last. Subscription rows are written directly (the webhook
// path is tested in tests/unit/billing/webhook.test.ts).
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { invitations, mailLog, memberships, subscriptions, users } from "@/db/schema";
import { loadViewer, type Viewer } from "@/lib/auth/guard";
import { resolvePlan } from "@/lib/auth/plan";
import { AppError } from "@/lib/errors";
import {
  acceptInvitation,
  createOrganization,
  getOrganizationForViewer,
  inviteMember,
  peekInvitation,
  removeMember,
  revokeInvitation,
} from "@/lib/organizations";
import { freshDb } from "./helpers/db";

beforeAll(freshDb);

let n = 0;
async function person(name: string): Promise<Viewer> {
  n += 1;
  const [u] = await getDb()
    .insert(users)
    .values({ email: `${name.toLowerCase()}-${n}@org.example`, name, emailVerified: new Date() })
    .returning({ id: users.id });
  return (await loadViewer(u.id))!;
}
const reload = async (v: Viewer) => (await loadViewer(v.id))!;

async function subscribe(organizationId: string, seats: number) {
  await getDb().insert(subscriptions).values({
    organizationId,
    plan: "institution",
    interval: "month",
    status: "active",
    stripeCustomerId: `cus_${organizationId.slice(0, 8)}`,
    stripeSubscriptionId: `sub_${organizationId}`,
    seats,
    currentPeriodEnd: new Date(Date.now() + 30 * 86_400_000),
  });
}
const setSeats = (organizationId: string, seats: number) =>
  getDb().update(subscriptions).set({ seats }).where(eq(subscriptions.organizationId, organizationId));

/** The plain token from the newest invitation e-mail to `to`. */
async function inviteToken(to: string): Promise<string> {
  const rows = await getDb().select().from(mailLog).where(eq(mailLog.to, to)).all();
  const m = rows.at(-1)?.text.match(/invitations\/accept\?token=([\w-]+)/);
  if (!m) throw new Error(`no invitation e-mail to ${to}`);
  return m[1];
}

async function expectProblem(p: Promise<unknown>, status: number, detail: RegExp) {
  try {
    await p;
    expect.unreachable("expected an error");
  } catch (e) {
    expect(e).toBeInstanceOf(AppError);
    expect((e as AppError).status).toBe(status);
    expect((e as AppError).detail).toMatch(detail);
  }
}

describe("seats and invitations", () => {
  it("refuses invitations without an Institution subscription", async () => {
    let owner = await person("Greta");
    const org = await createOrganization(owner, "Fen Survey Office");
    owner = await reload(owner);
    await expectProblem(inviteMember(owner, org.slug, "x@org.example"), 409, /need an active Institution subscription/);
  });

  it("invites up to the seat count (pending invitations reserve seats), then refuses with a clear message", async () => {
    let owner = await person("Owner");
    const org = await createOrganization(owner, "Three Seat Institute");
    owner = await reload(owner);
    await subscribe(org.id, 3);
    const a = await person("Ann");
    const b = await person("Ben");
    const c = await person("Cas");
    const first = await inviteMember(owner, org.slug, a.email);
    expect(first.seats).toMatchObject({ seats: 3, members: 1, pendingInvitations: 1, free: 1 });
    await inviteMember(owner, org.slug, b.email);
    await expectProblem(inviteMember(owner, org.slug, c.email), 409, /All 3 seats are taken \(1 member, 2 pending invitations\)/);
    // Nothing was written for the refused invitation.
    expect(await getDb().select().from(invitations).where(eq(invitations.email, c.email)).all()).toHaveLength(0);
    expect(await getDb().select().from(mailLog).where(eq(mailLog.to, c.email)).all()).toHaveLength(0);
    // A second invitation to the same address, or to a member, is refused too.
    await expectProblem(inviteMember(owner, org.slug, a.email), 409, /already has a pending invitation/);
    await expectProblem(inviteMember(owner, org.slug, owner.email), 409, /already a member/);

    // The invitation e-mail carries a one-time link; only its hash is stored.
    const token = await inviteToken(a.email);
    const stored = await getDb().select().from(invitations).where(eq(invitations.email, a.email)).get();
    expect(stored?.tokenHash).not.toContain(token);
    expect(await peekInvitation(token)).toMatchObject({ status: "ok", email: a.email, organization: { slug: org.slug } });

    // Accepting needs the invited address.
    await expectProblem(acceptInvitation(b, token), 403, /sent to .* signed in as/);
    expect((await resolvePlan(a.id)).plan).toBe("open");
    await acceptInvitation(a, token);
    expect(await resolvePlan(a.id)).toMatchObject({ plan: "institution", planSource: "organization" });
    await expectProblem(acceptInvitation(a, token), 410, /already been accepted/);

    // Withdrawing B's invitation frees its seat for C.
    const bInv = await getDb().select().from(invitations).where(eq(invitations.email, b.email)).get();
    await revokeInvitation(owner, org.slug, bInv!.id);
    expect(await peekInvitation(await inviteToken(b.email))).toEqual({ status: "revoked" });
    await inviteMember(owner, org.slug, c.email);
    const view = await getOrganizationForViewer(owner, org.slug);
    expect(view.seats).toMatchObject({ seats: 3, members: 2, pendingInvitations: 1, free: 0 });
    expect(view.inviteRefusal).toMatch(/All 3 seats are taken/);
  });

  it("only owners manage members; a non-member is not told the organisation exists", async () => {
    let owner = await person("Own");
    const org = await createOrganization(owner, "Quiet Basin Lab");
    owner = await reload(owner);
    await subscribe(org.id, 5);
    const m = await person("Mem");
    await inviteMember(owner, org.slug, m.email);
    await acceptInvitation(m, await inviteToken(m.email));
    const member = await reload(m);
    const stranger = await person("Str");
    await expectProblem(inviteMember(member, org.slug, "z@org.example"), 403, /Only the organisation's owners/);
    await expectProblem(inviteMember(stranger, org.slug, "z@org.example"), 404, /no organisation at this address/);
    await expectProblem(removeMember(owner, org.slug, owner.id), 409, /only owner/);
  });

  it("a removed member loses the plan on the very next read", async () => {
    let owner = await person("Rem");
    const org = await createOrganization(owner, "Removal Test Society");
    owner = await reload(owner);
    await subscribe(org.id, 3);
    const m = await person("Gone");
    await inviteMember(owner, org.slug, m.email);
    await acceptInvitation(m, await inviteToken(m.email));
    expect((await loadViewer(m.id))?.plan).toBe("institution");
    await removeMember(owner, org.slug, m.id);
    const after = await loadViewer(m.id);
    expect(after?.plan).toBe("open");
    expect(after?.organizations).toEqual([]);
    expect(await getDb().select().from(memberships).where(and(eq(memberships.organizationId, org.id), eq(memberships.userId, m.id))).all()).toEqual([]);
  });

  it("with fewer seats than members, the members who joined last lose the plan and invitations are refused", async () => {
    let owner = await person("Cut");
    const org = await createOrganization(owner, "Seat Cut Consortium");
    owner = await reload(owner);
    await subscribe(org.id, 4);
    const people = [await person("First"), await person("Second"), await person("Third")];
    for (const p of people) {
      await inviteMember(owner, org.slug, p.email);
      await acceptInvitation(p, await inviteToken(p.email));
      await new Promise((r) => setTimeout(r, 5)); // distinct joining instants
    }
    for (const p of people) expect((await resolvePlan(p.id)).plan).toBe("institution");
    // The owner buys 2 seats in the billing portal (the webhook updates the row).
    await setSeats(org.id, 2);
    expect((await resolvePlan(owner.id)).plan).toBe("institution");
    expect((await resolvePlan(people[0].id)).plan).toBe("institution");
    expect((await resolvePlan(people[1].id)).plan).toBe("open");
    expect((await resolvePlan(people[2].id)).plan).toBe("open");
    const view = await getOrganizationForViewer(owner, org.slug);
    expect(view.seats).toMatchObject({ seats: 2, members: 4, over: 2, free: 0 });
    expect(view.members.filter((x) => !x.hasSeat).map((x) => x.name)).toEqual(["Second", "Third"]);
    await expectProblem(inviteMember(owner, org.slug, "new@org.example"), 409, /4 members but pays for 2 seats\. Remove 2 members/);
    // Removing the first member hands their seat to the next in line.
    await removeMember(owner, org.slug, people[0].id);
    expect((await resolvePlan(people[1].id)).plan).toBe("institution");
    expect((await resolvePlan(people[2].id)).plan).toBe("open");
  });

  it("an invitation accepted after the seats were lowered is refused when no seat is left", async () => {
    let owner = await person("Late");
    const org = await createOrganization(owner, "Late Acceptance Lab");
    owner = await reload(owner);
    await subscribe(org.id, 3);
    const p = await person("Slow");
    await inviteMember(owner, org.slug, p.email);
    await setSeats(org.id, 1);
    await expectProblem(acceptInvitation(p, await inviteToken(p.email)), 409, /The only seat of Late Acceptance Lab is taken/);
    expect((await loadViewer(p.id))?.organizations).toEqual([]);
  });

  it("creates organisations with unique addresses and the creator as owner", async () => {
    let owner = await person("Maker");
    const one = await createOrganization(owner, "Rivers & Rain Ltd.");
    const two = await createOrganization(owner, "Rivers & Rain Ltd.");
    expect(one.slug).toBe("rivers-rain-ltd");
    expect(two.slug).toBe("rivers-rain-ltd-2");
    owner = await reload(owner);
    expect(owner.organizations.filter((o) => o.role === "owner").map((o) => o.slug).sort()).toEqual(["rivers-rain-ltd", "rivers-rain-ltd-2"]);
    await expect(createOrganization(owner, " ")).rejects.toThrow(/at least 2 characters/);
  });
});
