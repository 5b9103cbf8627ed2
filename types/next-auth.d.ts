import "next-auth";

// The session carries the user id only; role, plan and organisations come from
// the database through lib/auth/guard.ts.
declare module "next-auth" {
  interface Session {
    user?: { id?: string; name?: string | null; email?: string | null; image?: string | null };
  }
}
