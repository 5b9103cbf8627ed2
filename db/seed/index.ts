import bcrypt from "bcryptjs";
import { eq } from "drizzle-orm";
import { getDb } from "../index";
import { memberships, organizations, users } from "../schema";
import demo from "./demo-accounts.json";
import { seedDemoData } from "./demo-data";

export type SeedProfile = "full" | "test";

/**
 * Seed the synthetic demo data: demo accounts (one per role), the demo
 * Institution organization. Idempotent: existing rows are left alone.
 */
export async function seedDemo(_opts: { profile: SeedProfile }): Promise<void> {
  const db = getDb();
  const ids = new Map<string, string>();
  for (const a of demo.accounts) {
    const email = a.email.toLowerCase();
    const existing = await db.select({ id: users.id }).from(users).where(eq(users.email, email)).get();
    if (existing) {
      ids.set(a.key, existing.id);
      continue;
    }
    const row = await db
      .insert(users)
      .values({
        email,
        name: a.name,
        role: a.role as "contributor" | "moderator" | "admin",
        passwordHash: await bcrypt.hash(a.password, 10),
        emailVerified: new Date(),
        isDemo: true,
      })
      .returning({ id: users.id })
      .get();
    ids.set(a.key, row.id);
  }
  const org = demo.organization;
  let orgRow = await db.select({ id: organizations.id }).from(organizations).where(eq(organizations.slug, org.slug)).get();
  if (!orgRow) {
    orgRow = await db.insert(organizations).values({ name: org.name, slug: org.slug, isDemo: true }).returning({ id: organizations.id }).get();
    await db.insert(memberships).values({ organizationId: orgRow.id, userId: ids.get(org.ownerKey)!, role: "owner" });
  }
  // Stations, contributors, samples and queued batches of the synthetic demo scenario.
  await seedDemoData({ profile: _opts.profile });
}
