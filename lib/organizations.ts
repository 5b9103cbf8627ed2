import "server-only";
import { asc, eq } from "drizzle-orm";
import { getDb } from "@/db";
import { memberships, organizations, users } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { errors } from "@/lib/errors";
import { subscriptionRowsForOrganization } from "@/lib/billing/account";
import { planFromSubscriptions } from "@/lib/billing/state";

// Organisations and their members. Seats and invitations come with billing.

export type OrganizationView = {
  id: string;
  name: string;
  slug: string;
  isDemo: boolean;
  viewerRole: "owner" | "member" | "admin";
  members: { id: string; name: string | null; email: string; role: "owner" | "member" }[];
  /** The subscription that applies now (lib/billing decides), or null. */
  subscription: { plan: string; status: string; seats: number; standing: string } | null;
};

/** An organisation as its members (and admins) see it; 404 for everyone else, so its existence is not revealed. */
export async function getOrganizationForViewer(viewer: Viewer, slug: string): Promise<OrganizationView> {
  const db = getDb();
  const org = await db.select().from(organizations).where(eq(organizations.slug, slug)).get();
  const membership = org ? viewer.organizations.find((o) => o.id === org.id) : undefined;
  if (!org || (!membership && viewer.role !== "admin")) throw errors.notFound("There is no organisation at this address, or you are not a member of it.");
  const members = await db
    .select({ id: users.id, name: users.name, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.organizationId, org.id))
    .orderBy(asc(memberships.role), asc(users.name))
    .all();
  const paid = planFromSubscriptions(await subscriptionRowsForOrganization(org.id), new Date());
  const sub = paid.subscription ? { plan: paid.plan, status: paid.subscription.status, seats: paid.subscription.seats, standing: paid.standing } : null;
  return {
    id: org.id,
    name: org.name,
    slug: org.slug,
    isDemo: org.isDemo,
    viewerRole: membership?.role ?? "admin",
    members,
    subscription: sub,
  };
}
