import "server-only";
import { createHash, randomBytes } from "node:crypto";
import { and, eq, isNull } from "drizzle-orm";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { authTokens } from "@/db/schema";
import { AppError } from "@/lib/errors";

// One-time links of our own (e-mail verification, password reset). The link
// carries a random token; only its SHA-256 is stored, with an expiry. A token
// is consumed by one conditional UPDATE, so two clicks cannot both succeed.

export type TokenPurpose = "verify-email" | "reset-password";

export const TOKEN_TTL_MS: Record<TokenPurpose, number> = {
  "verify-email": 24 * 3600_000,
  "reset-password": 3600_000,
};

export function hashToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

/** Create a token for the user; returns the plain token (goes into the e-mail only). */
export async function createAuthToken(
  userId: string,
  purpose: TokenPurpose,
  opts: { db?: Pick<Db, "insert">; now?: Date } = {},
): Promise<{ token: string; expiresAt: Date }> {
  const token = randomBytes(32).toString("base64url");
  const now = opts.now ?? new Date();
  const expiresAt = new Date(now.getTime() + TOKEN_TTL_MS[purpose]);
  await (opts.db ?? getDb()).insert(authTokens).values({ userId, purpose, tokenHash: hashToken(token), expiresAt });
  return { token, expiresAt };
}

/**
 * Consume a token: returns its user id, or throws an AppError that says
 * plainly whether the link was already used, has expired, or is not valid.
 */
export async function consumeAuthToken(token: string, purpose: TokenPurpose, db: Db = getDb()): Promise<{ userId: string }> {
  const tokenHash = hashToken(token);
  const now = new Date();
  const row = await db.select().from(authTokens).where(and(eq(authTokens.tokenHash, tokenHash), eq(authTokens.purpose, purpose))).get();
  if (!row) throw new AppError("link-invalid", { detail: "This link is not valid. Check that you opened the whole link from the e-mail, or ask for a new one." });
  if (row.usedAt) throw new AppError("link-used", { detail: "This link has already been used. Each link works once; ask for a new one if you need it." });
  if (row.expiresAt.getTime() <= now.getTime())
    throw new AppError("link-expired", { detail: "This link has expired. Ask for a new one; it will be valid for a limited time." });
  const used = await db
    .update(authTokens)
    .set({ usedAt: now })
    .where(and(eq(authTokens.id, row.id), isNull(authTokens.usedAt)))
    .returning({ id: authTokens.id })
    .get();
  if (!used) throw new AppError("link-used", { detail: "This link has already been used. Each link works once; ask for a new one if you need it." });
  return { userId: row.userId };
}

/** Check a token without consuming it (to decide which form a page shows). */
export async function peekAuthToken(token: string, purpose: TokenPurpose): Promise<"ok" | "used" | "expired" | "invalid"> {
  const row = await getDb()
    .select()
    .from(authTokens)
    .where(and(eq(authTokens.tokenHash, hashToken(token)), eq(authTokens.purpose, purpose)))
    .get();
  if (!row) return "invalid";
  if (row.usedAt) return "used";
  if (row.expiresAt.getTime() <= Date.now()) return "expired";
  return "ok";
}

/** Mark every open token of this purpose as used (after a reset, older reset links stop working). */
export async function retireTokens(userId: string, purpose: TokenPurpose, db: Pick<Db, "update"> = getDb()): Promise<void> {
  await db
    .update(authTokens)
    .set({ usedAt: new Date() })
    .where(and(eq(authTokens.userId, userId), eq(authTokens.purpose, purpose), isNull(authTokens.usedAt)));
}
