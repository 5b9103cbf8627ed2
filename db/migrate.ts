import { migrate } from "drizzle-orm/libsql/migrator";
import path from "node:path";
import { dbReady, getDb } from "./index";

/** Apply the committed SQL migrations in ./drizzle (idempotent). */
export async function migrateDb(): Promise<void> {
  await dbReady();
  await migrate(getDb(), { migrationsFolder: path.resolve(process.cwd(), "drizzle") });
}
