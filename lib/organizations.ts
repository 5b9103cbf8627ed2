import "server-only";
import { createHash, randomBytes } from "node:crypto";
import { and, asc, count, eq, gt, isNull } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { invitations, memberships, organizations, reviewEvents, users } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { emailSchema } from "@/lib/auth/email";
import { env } from "@/lib/env";
import { AppError, errors } from "@/lib/errors";
import { queueMail } from "@/lib/mail";
import { subscriptionRowsForOrganization } from "@/lib/billing/account";
import { assignSeats, invitationRefusal, seatUse, type SeatUse } from "@/lib/billing/seats";
import { planFromSubscriptions, type PaidPlanState } from "@/lib/billing/state";

// Organisations, their members, Institution seats and invitations.
//
// Seats follow lib/billing/seats.ts: every member takes a seat (owners first,
// then in joining order); a pending invitation reserves one; an invitation is
// refused when members + pending invitations fill every seat, or while the
// organisation has more members than seats. Removing a member takes effect on
// their next request, because the guard reads memberships from the database
// every time.
//
// Invitation links carry a random token; only its SHA-256 is stored. Accepting
// needs an account signed in with the invited address.

export const INVITATION_TTL_DAYS = 14;
/** Organisations one person may own (a brake on accidental or abusive creation). */
export const MAX_OWNED_ORGANIZATIONS = 10;

export const organizationNameSchema = z
  .string({ error: "Enter the organisation's name." })
  .trim()
  .min(2, "Enter the organisation's name (at least 2 characters).")
  .max(120, "Use at most 120 characters.");
export const inviteInput = z.object({ email: emailSchema });
export const acceptInvitationInput = z.object({ token: z.string().trim().min(16, "This invitation link is not valid.").max(200, "This invitation link is not valid.") });

export type OrganizationMember = {
  id: string;
  name: string | null;
  email: string;
  role: "owner" | "member";
  joinedAt: Date;
  /** Whether the member holds one of the subscription's seats (always false without a subscription). */
  hasSeat: boolean;
};

export type PendingInvitation = { id: string; email: string; createdAt: Date; expiresAt: Date; invitedBy: string | null };

export type OrganizationView = {
  id: string;
  name: string;
  slug: string;
  isDemo: boolean;
  viewerRole: "owner" | "member" | "admin";
  members: OrganizationMember[];
  /** The subscription that applies now (lib/billing decides), or null. */
  subscription: {
    plan: string;
    status: string;
    seats: number;
    standing: PaidPlanState["standing"];
    interval: string;
    renewsAt: Date | null;
    endsAt: Date | null;
  } | null;
  /** Seats taken, reserved and free; null without a subscription. */
  seats: SeatUse | null;
  /** Pending invitations (shown to owners and admins only; empty for members). */
  invitations: PendingInvitation[];
  /** Why an invitation would be refused right now (null = the owner may invite). */
  inviteRefusal: string | null;
};

const hashInvitationToken = (token: string) => createHash("sha256").update(token).digest("hex");

function notFound(): AppError {
  return errors.notFound("There is no organisation at this address, or you are not a member of it.");
}

async function pendingInvitationCount(db: Db, organizationId: string, now: Date): Promise<number> {
  const row = await db
    .select({ n: count() })
    .from(invitations)
    .where(
      and(
        eq(invitations.organizationId, organizationId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
        gt(invitations.expiresAt, now),
      ),
    )
    .get();
  return row?.n ?? 0;
}

async function memberCount(db: Db, organizationId: string): Promise<number> {
  const row = await db.select({ n: count() }).from(memberships).where(eq(memberships.organizationId, organizationId)).get();
  return row?.n ?? 0;
}

/** The organisation's current paid state (subscription rows → lib/billing/state). */
export async function organizationPlan(organizationId: string, now: Date = new Date()): Promise<PaidPlanState> {
  return planFromSubscriptions(await subscriptionRowsForOrganization(organizationId), now);
}

/** Seat use now: seats of the subscription that applies, members, pending invitations. Null without one. */
export async function organizationSeats(organizationId: string, db: Db = getDb(), now: Date = new Date()): Promise<SeatUse | null> {
  const paid = await organizationPlan(organizationId, now);
  if (paid.plan !== "institution" || !paid.subscription) return null;
  return seatUse(paid.subscription.seats, await memberCount(db, organizationId), await pendingInvitationCount(db, organizationId, now));
}

function refusalFor(seats: SeatUse | null): string | null {
  if (!seats) return "Invitations need an active Institution subscription: its seats are what members take. Subscribe on the pricing page first.";
  return invitationRefusal(seats);
}

/** An organisation as its members (and admins) see it; 404 for everyone else, so its existence is not revealed. */
export async function getOrganizationForViewer(viewer: Viewer, slug: string): Promise<OrganizationView> {
  const db = getDb();
  const org = await db.select().from(organizations).where(eq(organizations.slug, slug)).get();
  const membership = org ? viewer.organizations.find((o) => o.id === org.id) : undefined;
  if (!org || (!membership && viewer.role !== "admin")) throw notFound();
  const rows = await db
    .select({ id: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.organizationId, org.id))
    .orderBy(asc(memberships.role), asc(memberships.createdAt), asc(users.name))
    .all();
  const now = new Date();
  const paid = await organizationPlan(org.id, now);
  const sub = paid.subscription && paid.plan === "institution" ? paid.subscription : null;
  const holders = new Set(
    sub ? assignSeats(rows.map((m) => ({ userId: m.id, role: m.role, joinedAt: m.joinedAt })), sub.seats).holders : [],
  );
  const seeInvitations = membership?.role === "owner" || viewer.role === "admin";
  const pending = seeInvitations
    ? await db
        .select({ id: invitations.id, email: invitations.email, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt, invitedBy: users.name })
        .from(invitations)
        .leftJoin(users, eq(users.id, invitations.invitedBy))
        .where(
          and(eq(invitations.organizationId, org.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)),
        )
        .orderBy(asc(invitations.createdAt))
        .all()
    : [];
  const seats = sub ? seatUse(sub.seats, rows.length, await pendingInvitationCount(db, org.id, now)) : null;
  return {
    id: org.id,
    name: org.name,
    slug: org.slug,
    isDemo: org.isDemo,
    viewerRole: membership?.role ?? "admin",
    members: rows.map((m) => ({ ...m, hasSeat: holders.has(m.id) })),
    subscription: sub
      ? {
          plan: paid.plan,
          status: sub.status,
          seats: sub.seats,
          standing: paid.standing,
          interval: sub.interval,
          renewsAt: paid.renewsAt,
          endsAt: paid.endsAt,
        }
      : null,
    seats,
    invitations: pending,
    inviteRefusal: refusalFor(seats),
  };
}

/** The organisation at `slug` if the viewer owns it; 404 when they are not a member, 403 when only a member. */
async function ownedOrganization(viewer: Viewer, slug: string) {
  const org = await getDb().select().from(organizations).where(eq(organizations.slug, slug)).get();
  const membership = org ? viewer.organizations.find((o) => o.id === org.id) : undefined;
  if (!org || !membership) throw notFound();
  if (membership.role !== "owner") throw errors.forbidden("Only the organisation's owners can manage members and invitations.");
  return org;
}

function slugify(name: string): string {
  const base = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 48)
    .replace(/-+$/g, "");
  return base || "organisation";
}

/** Create an organisation with the viewer as its owner. */
export async function createOrganization(viewer: Viewer, rawName: string): Promise<{ id: string; slug: string; name: string }> {
  const name = organizationNameSchema.parse(rawName);
  const owned = viewer.organizations.filter((o) => o.role === "owner").length;
  if (owned >= MAX_OWNED_ORGANIZATIONS)
    throw errors.conflict(`You already own ${owned} organisations, the most one person can. Use one of them, or ask us to raise the limit.`);
  return getDb().transaction(async (t) => {
    const tx = t as unknown as Db;
    const base = slugify(name);
    let slug = base;
    for (let i = 2; await tx.select({ id: organizations.id }).from(organizations).where(eq(organizations.slug, slug)).get(); i++) slug = `${base}-${i}`;
    const org = await tx.insert(organizations).values({ name, slug }).returning({ id: organizations.id }).get();
    await tx.insert(memberships).values({ organizationId: org.id, userId: viewer.id, role: "owner" });
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "organization",
      entityId: org.id,
      action: "organization:create",
      after: { name, slug },
    });
    return { id: org.id, slug, name };
  });
}

/** Invite someone by e-mail to take a seat. Refused (409) beyond the seat count. */
export async function inviteMember(
  viewer: Viewer,
  slug: string,
  rawEmail: string,
): Promise<{ id: string; email: string; expiresAt: Date; seats: SeatUse }> {
  const { email } = inviteInput.parse({ email: rawEmail });
  const org = await ownedOrganization(viewer, slug);
  const db = getDb();
  const token = randomBytes(32).toString("base64url");
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_TTL_DAYS * 86_400_000);
  return db.transaction(async (t) => {
    const tx = t as unknown as Db;
    const already = await tx
      .select({ id: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.organizationId, org.id), eq(users.email, email)))
      .get();
    if (already) throw errors.conflict(`${email} is already a member of ${org.name}.`);
    const pending = await tx
      .select({ id: invitations.id })
      .from(invitations)
      .where(
        and(
          eq(invitations.organizationId, org.id),
          eq(invitations.email, email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, now),
        ),
      )
      .get();
    if (pending) throw errors.conflict(`${email} already has a pending invitation. Withdraw it first to send a new link.`);
    // Checked inside the write transaction, so two invitations sent at once cannot both take the last seat.
    const seats = await organizationSeats(org.id, tx, now);
    const refusal = refusalFor(seats);
    if (refusal || !seats) throw errors.conflict(refusal ?? "No seats.");
    const row = await tx
      .insert(invitations)
      .values({ organizationId: org.id, email, tokenHash: hashInvitationToken(token), invitedBy: viewer.id, expiresAt })
      .returning({ id: invitations.id })
      .get();
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "organization",
      entityId: org.id,
      action: "invitation:create",
      after: { invitationId: row.id, email },
    });
    await queueMail(
      {
        to: email,
        template: "seat-invitation",
        data: {
          organization: org.name,
          inviterName: viewer.name,
          url: `${env().APP_URL}/invitations/accept?token=${encodeURIComponent(token)}`,
          expiresDays: INVITATION_TTL_DAYS,
        },
      },
      tx,
    );
    return { id: row.id, email, expiresAt, seats: { ...seats, pendingInvitations: seats.pendingInvitations + 1, free: seats.free - 1 } };
  });
}

/** Withdraw a pending invitation (its link stops working at once). */
export async function revokeInvitation(viewer: Viewer, slug: string, invitationId: string): Promise<void> {
  const org = await ownedOrganization(viewer, slug);
  await getDb().transaction(async (t) => {
    const tx = t as unknown as Db;
    const done = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.id, invitationId), eq(invitations.organizationId, org.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
      .returning({ id: invitations.id, email: invitations.email })
      .get();
    if (!done) throw errors.notFound("There is no pending invitation with this id in this organisation.");
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "organization",
      entityId: org.id,
      action: "invitation:revoke",
      before: { invitationId: done.id, email: done.email },
    });
  });
}

/**
 * Remove a member. They lose the organisation's plan on their very next
 * request. Owners cannot remove themselves while they are the only owner.
 */
export async function removeMember(viewer: Viewer, slug: string, userId: string): Promise<void> {
  const org = await ownedOrganization(viewer, slug);
  await getDb().transaction(async (t) => {
    const tx = t as unknown as Db;
    const m = await tx
      .select({ role: memberships.role, email: users.email })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.organizationId, org.id), eq(memberships.userId, userId)))
      .get();
    if (!m) throw errors.notFound("This person is not a member of the organisation.");
    if (m.role === "owner") {
      const owners = await tx
        .select({ n: count() })
        .from(memberships)
        .where(and(eq(memberships.organizationId, org.id), eq(memberships.role, "owner")))
        .get();
      if ((owners?.n ?? 0) <= 1) throw errors.conflict("An organisation needs an owner: this is its only owner, who cannot be removed.");
    }
    await tx.delete(memberships).where(and(eq(memberships.organizationId, org.id), eq(memberships.userId, userId)));
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "organization",
      entityId: org.id,
      action: "member:remove",
      before: { userId, email: m.email, role: m.role },
    });
  });
}

export type InvitationPeek =
  | { status: "ok"; organization: { name: string; slug: string }; email: string; expiresAt: Date }
  | { status: "used" | "expired" | "revoked" | "invalid" };

/** What an invitation link is, without using it (for the accept page). */
export async function peekInvitation(token: string): Promise<InvitationPeek> {
  const row = await getDb()
    .select({ inv: invitations, orgName: organizations.name, orgSlug: organizations.slug })
    .from(invitations)
    .innerJoin(organizations, eq(organizations.id, invitations.organizationId))
    .where(eq(invitations.tokenHash, hashInvitationToken(token)))
    .get();
  if (!row) return { status: "invalid" };
  if (row.inv.acceptedAt) return { status: "used" };
  if (row.inv.revokedAt) return { status: "revoked" };
  if (row.inv.expiresAt.getTime() <= Date.now()) return { status: "expired" };
  return { status: "ok", organization: { name: row.orgName, slug: row.orgSlug }, email: row.inv.email, expiresAt: row.inv.expiresAt };
}

/** Accept an invitation as the signed-in viewer, whose address must be the invited one. */
export async function acceptInvitation(viewer: Viewer, token: string): Promise<{ slug: string; name: string }> {
  const db = getDb();
  const tokenHash = hashInvitationToken(token);
  return db.transaction(async (t) => {
    const tx = t as unknown as Db;
    const row = await tx
      .select({ inv: invitations, orgName: organizations.name, orgSlug: organizations.slug })
      .from(invitations)
      .innerJoin(organizations, eq(organizations.id, invitations.organizationId))
      .where(eq(invitations.tokenHash, tokenHash))
      .get();
    if (!row) throw new AppError("link-invalid", { detail: "This invitation link is not valid. Check that you opened the whole link from the e-mail." });
    const { inv } = row;
    if (inv.acceptedAt) throw new AppError("link-used", { detail: "This invitation has already been accepted. Each invitation works once." });
    if (inv.revokedAt) throw new AppError("link-invalid", { detail: "The organisation's owner withdrew this invitation. Ask them for a new one." });
    if (inv.expiresAt.getTime() <= Date.now())
      throw new AppError("link-expired", { detail: "This invitation has expired. Ask the organisation's owner to send a new one." });
    if (inv.email !== viewer.email.toLowerCase())
      throw errors.forbidden(
        `This invitation was sent to ${inv.email}, but you are signed in as ${viewer.email}. Sign in with the invited address, or ask the owner to invite this one.`,
      );
    const member = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.organizationId, inv.organizationId), eq(memberships.userId, viewer.id)))
      .get();
    if (!member) {
      // The invitation reserved a seat; if the owner has since bought fewer seats, there may be none left.
      const seats = await organizationSeats(inv.organizationId, tx);
      if (!seats)
        throw errors.conflict(`${row.orgName} has no active Institution subscription at the moment, so there is no seat to take. Ask its owner.`);
      if (seats.members >= seats.seats)
        throw errors.conflict(
          `${seats.seats === 1 ? "The only seat" : `All ${seats.seats} seats`} of ${row.orgName} ${seats.seats === 1 ? "is" : "are"} taken. Ask its owner to add a seat, then open this link again.`,
        );
      await tx.insert(memberships).values({ organizationId: inv.organizationId, userId: viewer.id, role: "member" });
    }
    await tx.update(invitations).set({ acceptedAt: new Date() }).where(eq(invitations.id, inv.id));
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "organization",
      entityId: inv.organizationId,
      action: "invitation:accept",
      after: { invitationId: inv.id, userId: viewer.id },
    });
    return { slug: row.orgSlug, name: row.orgName };
  });
}

