import "server-only";
import { and, asc, count, eq, like, or, type SQL } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { ROLES, reviewEvents, users, type Role } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { errors } from "@/lib/errors";
import { queueMail } from "@/lib/mail";

// Administration of accounts: list and search, change role, disable/enable.
// Every change writes a review_events row (who, what, before, after, why).

export const PAGE_SIZE = 50;

export const listUsersQuery = z.object({
  q: z.string().trim().max(200).optional(),
  role: z.enum(ROLES).optional(),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});

export type AdminUserRow = {
  id: string;
  email: string;
  name: string | null;
  role: Role;
  emailVerified: Date | null;
  disabledAt: Date | null;
  isDemo: boolean;
  createdAt: Date;
};

export async function listUsers(params: z.infer<typeof listUsersQuery>): Promise<{ rows: AdminUserRow[]; total: number; page: number; pageSize: number }> {
  const db = getDb();
  const where: SQL[] = [];
  if (params.q) {
    // LIKE wildcards in the search text are dropped rather than escaped.
    const pattern = `%${params.q.replace(/[%_]/g, "").toLowerCase()}%`;
    where.push(or(like(users.email, pattern), like(users.name, pattern), like(users.affiliation, pattern))!);
  }
  if (params.role) where.push(eq(users.role, params.role));
  const cond = where.length ? and(...where) : undefined;
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      role: users.role,
      emailVerified: users.emailVerified,
      disabledAt: users.disabledAt,
      isDemo: users.isDemo,
      createdAt: users.createdAt,
    })
    .from(users)
    .where(cond)
    .orderBy(asc(users.email))
    .limit(PAGE_SIZE)
    .offset((params.page - 1) * PAGE_SIZE)
    .all();
  const total = (await db.select({ n: count() }).from(users).where(cond).get())?.n ?? 0;
  return { rows, total, page: params.page, pageSize: PAGE_SIZE };
}

export const updateUserInput = z
  .object({
    role: z.enum(ROLES, { error: "Choose contributor, moderator or admin." }).optional(),
    disabled: z.boolean().optional(),
    reason: z.string().trim().max(500, "Use at most 500 characters.").optional(),
  })
  .refine((v) => v.role !== undefined || v.disabled !== undefined, { message: "Say what to change: a role, or disabled true/false." });

/** Change a user's role and/or disabled state; one audit row per change; a notice on role change. */
export async function updateUser(actor: Viewer, userId: string, input: z.infer<typeof updateUserInput>): Promise<AdminUserRow> {
  if (userId === actor.id) throw errors.conflict("You cannot change your own role or disable your own account; ask another administrator.");
  const db = getDb();
  const before = await db.select().from(users).where(eq(users.id, userId)).get();
  if (!before) throw errors.notFound("There is no user with this id.");
  const reason = input.reason || null;
  await db.transaction(async (t) => {
    const tx = t as unknown as Db;
    if (input.role !== undefined && input.role !== before.role) {
      await tx.update(users).set({ role: input.role }).where(eq(users.id, userId));
      await tx.insert(reviewEvents).values({
        actorId: actor.id,
        entityType: "user",
        entityId: userId,
        action: "role-changed",
        before: { role: before.role },
        after: { role: input.role },
        reason,
      });
      await queueMail({ to: before.email, template: "role-changed", data: { name: before.name, from: before.role, to: input.role, reason } }, tx);
    }
    if (input.disabled !== undefined && input.disabled !== Boolean(before.disabledAt)) {
      const disabledAt = input.disabled ? new Date() : null;
      await tx.update(users).set({ disabledAt }).where(eq(users.id, userId));
      await tx.insert(reviewEvents).values({
        actorId: actor.id,
        entityType: "user",
        entityId: userId,
        action: input.disabled ? "disabled" : "enabled",
        before: { disabledAt: before.disabledAt?.toISOString() ?? null },
        after: { disabledAt: disabledAt?.toISOString() ?? null },
        reason,
      });
    }
  });
  const after = await db.select().from(users).where(eq(users.id, userId)).get();
  return {
    id: after!.id,
    email: after!.email,
    name: after!.name,
    role: after!.role,
    emailVerified: after!.emailVerified,
    disabledAt: after!.disabledAt,
    isDemo: after!.isDemo,
    createdAt: after!.createdAt,
  };
}
