import "server-only";
import { and, desc, eq, inArray, isNull, or, sql } from "drizzle-orm";
import { z } from "zod";
import { getClient, getDb } from "@/db";
import { apiKeys, organizations, reviewEvents, users, type Plan } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { lowestPlanAllowing, planLimits, PLAN_CATALOGUE } from "@/lib/billing/plans";
import { AppError, errors } from "@/lib/errors";
import { generateApiKey, hashApiKey } from "./key-format";

// API keys: made by Researcher accounts (personal keys) and by the owners of
// organisations on the Institution plan (the organisation's keys, which its
// members can see). A key is shown once; the database keeps its SHA-256 and a
// visible prefix. Revoking takes effect on the next request (every request
// looks the key up). Every operation writes an audit row (review_events,
// entity "api-key"); the secret never appears there.

/** What a key may be used for. v1 has one scope: every endpoint the holder's plan includes. */
export const API_KEY_SCOPES = ["api:v1"] as const;

export const apiKeyNameInput = z.object({
  name: z
    .string({ error: "Give the key a name." })
    .trim()
    .min(1, { error: "Give the key a name, e.g. the script or server that will use it." })
    .max(60, { error: "Keep the name under 60 characters." }),
});

export type ApiKeyView = {
  id: string;
  name: string;
  prefix: string;
  /** null = a personal key. */
  organizationId: string | null;
  organizationName: string | null;
  createdBy: string | null;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  /** Can the viewer revoke it? */
  canRevoke: boolean;
};

/** Where the viewer's new keys go, and how many they may hold. */
export type KeyHolder =
  | { kind: "user"; userId: string; plan: Plan; maxKeys: number; canCreate: boolean; reason: string | null }
  | { kind: "organization"; organizationId: string; organizationName: string; plan: Plan; maxKeys: number; canCreate: boolean; reason: string | null };

export function keyHolderFor(viewer: Viewer): KeyHolder {
  const maxKeys = planLimits(viewer.plan).apiKeys;
  if (viewer.plan === "institution" && viewer.planOrganizationId) {
    const org = viewer.organizations.find((o) => o.id === viewer.planOrganizationId);
    const owner = org?.role === "owner";
    return {
      kind: "organization",
      organizationId: viewer.planOrganizationId,
      organizationName: org?.name ?? "your organisation",
      plan: viewer.plan,
      maxKeys,
      canCreate: owner,
      reason: owner ? null : `Keys of ${org?.name ?? "your organisation"} are made and revoked by its owner; you can see them here.`,
    };
  }
  const needed = lowestPlanAllowing((l) => l.apiKeys > 0) ?? "researcher";
  return {
    kind: "user",
    userId: viewer.id,
    plan: viewer.plan,
    maxKeys,
    canCreate: maxKeys > 0,
    reason: maxKeys > 0 ? null : `API keys come with the ${PLAN_CATALOGUE[needed].name} and Institution plans. Without a key the API answers anonymous requests with the Open plan's daily limits.`,
  };
}

function ownedOrgIds(viewer: Viewer): string[] {
  return viewer.organizations.filter((o) => o.role === "owner").map((o) => o.id);
}

/** The viewer's personal keys and the keys of every organisation they belong to, newest first. */
export async function listApiKeys(viewer: Viewer): Promise<ApiKeyView[]> {
  const orgIds = viewer.organizations.map((o) => o.id);
  const owned = new Set(ownedOrgIds(viewer));
  const rows = await getDb()
    .select({
      id: apiKeys.id,
      name: apiKeys.name,
      prefix: apiKeys.prefix,
      userId: apiKeys.userId,
      organizationId: apiKeys.organizationId,
      organizationName: organizations.name,
      createdBy: users.name,
      createdByEmail: users.email,
      createdAt: apiKeys.createdAt,
      lastUsedAt: apiKeys.lastUsedAt,
      revokedAt: apiKeys.revokedAt,
    })
    .from(apiKeys)
    .leftJoin(organizations, eq(organizations.id, apiKeys.organizationId))
    .leftJoin(users, eq(users.id, apiKeys.userId))
    .where(
      orgIds.length
        ? or(and(eq(apiKeys.userId, viewer.id), isNull(apiKeys.organizationId)), inArray(apiKeys.organizationId, orgIds))
        : and(eq(apiKeys.userId, viewer.id), isNull(apiKeys.organizationId)),
    )
    .orderBy(desc(apiKeys.createdAt))
    .all();
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    prefix: r.prefix,
    organizationId: r.organizationId,
    organizationName: r.organizationName,
    createdBy: r.createdBy ?? r.createdByEmail,
    createdAt: r.createdAt.toISOString(),
    lastUsedAt: r.lastUsedAt ? r.lastUsedAt.toISOString() : null,
    revokedAt: r.revokedAt ? r.revokedAt.toISOString() : null,
    canRevoke: !r.revokedAt && (r.organizationId ? owned.has(r.organizationId) : r.userId === viewer.id),
  }));
}

/** Make a key for the viewer (personal, or their organisation's). Returns the secret once. */
export async function createApiKey(viewer: Viewer, input: { name: string }): Promise<{ key: ApiKeyView; secret: string }> {
  const { name } = apiKeyNameInput.parse(input);
  const holder = keyHolderFor(viewer);
  if (!holder.canCreate) {
    if (holder.maxKeys === 0) throw new AppError("plan-required", { detail: holder.reason ?? undefined });
    throw errors.forbidden(holder.reason ?? undefined);
  }
  const organizationId = holder.kind === "organization" ? holder.organizationId : null;
  const { key: secret, prefix, hash } = generateApiKey();
  const db = getDb();
  const id = crypto.randomUUID();
  const now = new Date();
  await db.transaction(async (tx) => {
    const active = await tx
      .select({ n: sql<number>`count(*)` })
      .from(apiKeys)
      .where(
        and(
          isNull(apiKeys.revokedAt),
          organizationId ? eq(apiKeys.organizationId, organizationId) : and(eq(apiKeys.userId, viewer.id), isNull(apiKeys.organizationId)),
        ),
      )
      .get();
    if ((active?.n ?? 0) >= holder.maxKeys) {
      throw errors.conflict(
        `${holder.kind === "organization" ? "The organisation has" : "You have"} ${holder.maxKeys} active keys, the most the ${PLAN_CATALOGUE[holder.plan].name} plan allows. Revoke one you no longer use first.`,
      );
    }
    await tx.insert(apiKeys).values({ id, userId: viewer.id, organizationId, name, prefix, hash, scopes: [...API_KEY_SCOPES], createdAt: now });
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "api-key",
      entityId: id,
      action: "create",
      before: null,
      after: { name, prefix, organizationId, scopes: API_KEY_SCOPES },
      at: now,
    });
  });
  const key = (await listApiKeys(viewer)).find((k) => k.id === id);
  if (!key) throw new Error("the new key was not found after it was written");
  return { key, secret };
}

/** Revoke a key the viewer may manage; effective for the next request. Revoking twice is a conflict. */
export async function revokeApiKey(viewer: Viewer, keyId: string): Promise<ApiKeyView> {
  const db = getDb();
  const row = await db.select().from(apiKeys).where(eq(apiKeys.id, keyId)).get();
  const mayManage = row && (row.organizationId ? ownedOrgIds(viewer).includes(row.organizationId) : row.userId === viewer.id);
  const maySee = row && (mayManage || (row.organizationId && viewer.organizations.some((o) => o.id === row.organizationId)));
  if (!row || !maySee) throw errors.notFound("There is no key with this id among yours.");
  if (!mayManage) throw errors.forbidden("Only the organisation's owner can revoke its keys.");
  if (row.revokedAt) throw errors.conflict("This key was already revoked.");
  const now = new Date();
  await db.transaction(async (tx) => {
    await tx.update(apiKeys).set({ revokedAt: now }).where(and(eq(apiKeys.id, keyId), isNull(apiKeys.revokedAt)));
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "api-key",
      entityId: keyId,
      action: "revoke",
      before: { name: row.name, prefix: row.prefix, revokedAt: null },
      after: { name: row.name, prefix: row.prefix, revokedAt: now.toISOString() },
      at: now,
    });
  });
  const key = (await listApiKeys(viewer)).find((k) => k.id === keyId);
  if (!key) throw new Error("the revoked key was not found after it was written");
  return key;
}

export type ActiveKey = { id: string; name: string; prefix: string; userId: string; organizationId: string | null };

/**
 * The active key with this secret, or null (unknown or revoked). One indexed read by hash, never cached,
 * so a revocation counts from the next request. (Looking up by hash leaks nothing useful through timing:
 * a caller cannot steer the hash of what they send.) Raw SQL: this runs on every keyed request.
 */
export async function findActiveKey(secret: string): Promise<ActiveKey | null> {
  const rs = await getClient().execute({
    sql: "SELECT id, name, prefix, user_id, organization_id FROM api_keys WHERE hash = ? AND revoked_at IS NULL",
    args: [hashApiKey(secret)],
  });
  const row = rs.rows[0];
  if (!row) return null;
  return {
    id: String(row.id),
    name: String(row.name),
    prefix: String(row.prefix),
    userId: String(row.user_id),
    organizationId: row.organization_id === null ? null : String(row.organization_id),
  };
}
