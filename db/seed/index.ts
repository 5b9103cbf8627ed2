import bcrypt from "bcryptjs";
import { eq } from "drizzle-orm";
import { getDb } from "../index";
import { memberships, organizations, users } from "../schema";
import demo from "./demo-accounts.json";
import { seedDemoData } from "./demo-data";
import { seedDemoEdition } from "./demo-edition";

export type SeedProfile = "full" | "test";

/**
 * Seed the synthetic demo data: demo accounts (one per role), the demo
 * Institution organization, then the stations and samples. Idempotent:
 * existing rows are left alone.
 */
export async function seedDemo(opts: { profile: SeedProfile }): Promise<void> {
  const accountIds = await seedAccounts();
  await seedStationsAndSamples({ profile: opts.profile, accountIds });
  // The first edition (synthetic demo data), built from the accepted samples and published.
  await seedDemoEdition({ profile: opts.profile, log: (m) => console.log(`[seed] ${m}`) });
}

/**
 * Synthetic stations, batches and samples (the generator lives in lib/demo;
 * db/seed/demo-data.ts writes them). `accountIds` maps demo-accounts.json keys to user ids,
 * e.g. accountIds.get("contributor"). "test" is the small profile the
 * end-to-end tests use; "full" is what `npm start` shows.
 */
async function seedStationsAndSamples(args: { profile: SeedProfile; accountIds: Map<string, string> }): Promise<void> {
  // Stations, contributors, samples and queued batches of the synthetic demo scenario (lib/demo).
  await seedDemoData({ profile: args.profile });
}

/** Demo accounts (one per role) and the demo Institution organisation; returns key → user id. */
async function seedAccounts(): Promise<Map<string, string>> {
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
  return ids;
}
