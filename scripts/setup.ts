// Applies migrations and seeds the synthetic demo data once (idempotent).
// Run by `npm start` and by the end-to-end test setup; safe to run again.
import { closeDb } from "../db";
import { migrateDb } from "../db/migrate";
import { seedDemo } from "../db/seed";

async function main() {
  await migrateDb();
  await seedDemo({ profile: process.env.RAINPRINT_SEED_PROFILE === "test" ? "test" : "full" });
  closeDb();
}

main().catch((e) => {
  console.error(e instanceof Error ? (e.stack ?? e.message) : e);
  process.exit(1);
});
