import type { Plan, Role } from "@/lib/auth/kinds";

// The one list of navigation items. Each item says who sees it; the header
// shows the items the current viewer passes. To add a page to the navigation,
// add one line here (and its row in tests/e2e/policy.ts).
//
// Visibility is a convenience, never protection: every page checks on the
// server through lib/auth/guard.ts.

export type NavAudience =
  | "everyone"
  | "signed-out"
  | "signed-in"
  | { roles?: readonly Role[]; plans?: readonly Plan[] };

export type NavItem = {
  href: string;
  label: string;
  audience: NavAudience;
  /** "main" = top bar; "account" = the account group at the right. */
  group: "main" | "account";
};

export const NAV_ITEMS: readonly NavItem[] = [
  // Later pages add a line here, e.g.:
  // { href: "/map", label: "Map", audience: "everyone", group: "main" },
  // { href: "/lookup", label: "Site lookup", audience: "everyone", group: "main" },
  // { href: "/stations", label: "Stations", audience: "everyone", group: "main" },
  // { href: "/contribute", label: "Contribute", audience: "signed-in", group: "main" },
  // { href: "/review", label: "Review desk", audience: { roles: ["moderator", "admin"] }, group: "main" },
  // { href: "/editions", label: "Editions", audience: "everyone", group: "main" },
  // { href: "/api-docs", label: "API", audience: "everyone", group: "main" },
  // { href: "/pricing", label: "Pricing", audience: "everyone", group: "main" },
  { href: "/map", label: "Map", audience: "everyone", group: "main" },
  { href: "/lookup", label: "Site lookup", audience: "everyone", group: "main" },
  { href: "/editions", label: "Editions", audience: "everyone", group: "main" },
  { href: "/contribute", label: "Contribute", audience: "signed-in", group: "main" },
  { href: "/review", label: "Review desk", audience: { roles: ["moderator", "admin"] }, group: "main" },
  { href: "/downloads", label: "Downloads", audience: "everyone", group: "main" },
  { href: "/pricing", label: "Pricing", audience: "everyone", group: "main" },
  { href: "/jobs", label: "Jobs", audience: { roles: ["moderator", "admin"] }, group: "main" },
  { href: "/admin/users", label: "Users", audience: { roles: ["admin"] }, group: "main" },
  { href: "/admin/elevation", label: "Elevation", audience: { roles: ["admin"] }, group: "main" },
  { href: "/api", label: "API", audience: "everyone", group: "main" },
  { href: "/account", label: "Account", audience: "signed-in", group: "account" },
  { href: "/account/api-keys", label: "API keys", audience: { plans: ["researcher", "institution"] }, group: "account" },
  { href: "/account/usage", label: "Usage", audience: { plans: ["researcher", "institution"] }, group: "account" },
  { href: "/sign-in", label: "Sign in", audience: "signed-out", group: "account" },
  { href: "/sign-up", label: "Create account", audience: "signed-out", group: "account" },
];

export type NavViewer = { role: Role; plan: Plan } | null;

export function visibleTo(item: NavItem, viewer: NavViewer): boolean {
  const a = item.audience;
  if (a === "everyone") return true;
  if (a === "signed-out") return viewer === null;
  if (a === "signed-in") return viewer !== null;
  if (!viewer) return false;
  if (a.roles && !a.roles.includes(viewer.role)) return false;
  if (a.plans && !a.plans.includes(viewer.plan)) return false;
  return true;
}

export function navFor(viewer: NavViewer, group?: NavItem["group"]): NavItem[] {
  return NAV_ITEMS.filter((i) => (group ? i.group === group : true) && visibleTo(i, viewer));
}
