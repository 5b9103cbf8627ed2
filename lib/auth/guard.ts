import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { getServerSession } from "next-auth";
import { headers } from "next/headers";
import { forbidden, redirect } from "next/navigation";
import { getDb } from "@/db";
import { memberships, organizations, users, type Plan, type Role } from "@/db/schema";
import { errors } from "@/lib/errors";
import { authOptions } from "./options";
import { resolvePlan, type PlanSource } from "./plan";

// THE guard. Every route handler, server action and server page that needs to
// know who is asking goes through here. The session cookie only says which
// user id signed in; role, plan, organisations and whether the account is
// still enabled are read from the database on every call, so a role change or
// a disabled account takes effect on the next request.

export type ViewerOrganization = { id: string; name: string; slug: string; role: "owner" | "member" };

export type Viewer = {
  id: string;
  email: string;
  name: string | null;
  role: Role;
  plan: Plan;
  planSource: PlanSource;
  /** The organisation whose subscription gives the plan (planSource "organization"), else null. */
  planOrganizationId: string | null;
  organizations: ViewerOrganization[];
};

export type Requirement = {
  /** Allowed roles; omitted = any signed-in user. */
  roles?: readonly Role[];
  /** Allowed plans; omitted = any plan. */
  plans?: readonly Plan[];
};

/** Roles from least to most privileged. */
export const ROLE_ORDER: readonly Role[] = ["contributor", "moderator", "admin"];

/** `atLeast("moderator")` → ["moderator", "admin"]. */
export function atLeast(role: Role): Role[] {
  return ROLE_ORDER.slice(ROLE_ORDER.indexOf(role));
}

/** Build the viewer for a user id straight from the database (null if unknown, disabled or unverified). */
export async function loadViewer(userId: string): Promise<Viewer | null> {
  const db = getDb();
  const user = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      role: users.role,
      disabledAt: users.disabledAt,
      emailVerified: users.emailVerified,
    })
    .from(users)
    .where(eq(users.id, userId))
    .get();
  if (!user || user.disabledAt || !user.emailVerified) return null;
  const orgs = await db
    .select({ id: organizations.id, name: organizations.name, slug: organizations.slug, role: memberships.role })
    .from(memberships)
    .innerJoin(organizations, eq(organizations.id, memberships.organizationId))
    .where(and(eq(memberships.userId, user.id)))
    .orderBy(asc(organizations.name))
    .all();
  const { plan, planSource, organizationId } = await resolvePlan(user.id);
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    plan,
    planSource,
    planOrganizationId: organizationId ?? null,
    organizations: orgs,
  };
}

/** The signed-in viewer, or null. Never throws for a missing or stale session. */
export async function getViewer(): Promise<Viewer | null> {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  return loadViewer(id);
}

/** Does this viewer meet the requirement? */
export function satisfies(viewer: Viewer, req: Requirement = {}): boolean {
  if (req.roles && !req.roles.includes(viewer.role)) return false;
  if (req.plans && !req.plans.includes(viewer.plan)) return false;
  return true;
}

/** For route handlers and server actions: the viewer, or an AppError (401 signed out, 403 not allowed). */
export async function requireViewer(req: Requirement = {}): Promise<Viewer> {
  const viewer = await getViewer();
  return checkViewer(viewer, req);
}

/** The pure part of requireViewer (also used by the route wrapper). */
export function checkViewer(viewer: Viewer | null, req: Requirement = {}): Viewer {
  if (!viewer) throw errors.unauthenticated();
  if (req.roles && !req.roles.includes(viewer.role)) throw errors.forbidden();
  if (req.plans && !req.plans.includes(viewer.plan))
    throw errors.forbidden("This needs a different plan. See the pricing page for what each plan includes.");
  return viewer;
}

/** Sign-in address that brings the person back to `path` afterwards. */
export function signInUrl(path: string): string {
  const safe = path.startsWith("/") && !path.startsWith("//") ? path : "/";
  return `/sign-in?callbackUrl=${encodeURIComponent(safe)}`;
}

/**
 * For server pages: the viewer, or a redirect to sign-in (signed out) or the
 * 403 page (signed in but not allowed). `path` defaults to the address the
 * proxy recorded for this request.
 */
export async function requirePageViewer(req: Requirement & { path?: string } = {}): Promise<Viewer> {
  const viewer = await getViewer();
  if (!viewer) {
    const path = req.path ?? (await headers()).get("x-rainprint-path") ?? "/";
    redirect(signInUrl(path));
  }
  if (!satisfies(viewer, req)) forbidden();
  return viewer;
}
