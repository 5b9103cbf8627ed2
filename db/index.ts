import { createClient, type Client } from "@libsql/client";
import { drizzle, type LibSQLDatabase } from "drizzle-orm/libsql";
import { mkdirSync } from "node:fs";
import path from "node:path";
import * as schema from "./schema";

// The one database client. An embedded file by default (WAL, busy timeout);
// a libSQL server URL (libsql://, http(s)://, ws(s)://) works unchanged.

export type Db = LibSQLDatabase<typeof schema>;

type Handle = { client: Client; db: Db; ready: Promise<void> };

const globalForDb = globalThis as unknown as { __rainprintDb?: Handle };

function databaseUrl(): string {
  return process.env.DATABASE_URL || "file:./data/rainprint.db";
}

function open(): Handle {
  const url = databaseUrl();
  if (url.startsWith("file:") && !url.includes(":memory:")) {
    const file = url.slice("file:".length).replace(/^\/\/(localhost)?/, "");
    mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  }
  const client = createClient({
    url,
    authToken: process.env.DATABASE_AUTH_TOKEN || undefined,
    // busy timeout in milliseconds for the embedded file
    timeout: 10_000,
  });
  const ready = url.startsWith("file:")
    ? client.execute("PRAGMA journal_mode = WAL").then(() => undefined)
    : Promise.resolve();
  return { client, db: drizzle(client, { schema }), ready };
}

function handle(): Handle {
  if (!globalForDb.__rainprintDb) globalForDb.__rainprintDb = open();
  return globalForDb.__rainprintDb;
}

/** The Drizzle database. */
export function getDb(): Db {
  return handle().db;
}

/** The underlying libSQL client (raw SQL, batches, pragmas). */
export function getClient(): Client {
  return handle().client;
}

/** Resolves once per-file settings (WAL) are applied. */
export function dbReady(): Promise<void> {
  return handle().ready;
}

/** Close the client (scripts and tests); the next call opens a new one. */
export function closeDb(): void {
  const h = globalForDb.__rainprintDb;
  if (h) {
    h.client.close();
    globalForDb.__rainprintDb = undefined;
  }
}

export { schema };
