import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { apiKeys, reviewEvents } from "@/db/schema";
import { hashApiKey } from "@/lib/api/key-format";
import { createApiKey, findActiveKey, keyHolderFor, listApiKeys, revokeApiKey } from "@/lib/api/keys";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import { freshDb } from "../helpers/db";
import { institution, person, researcher } from "./fixtures";

beforeAll(freshDb);

describe("API keys", () => {
  it("a Researcher makes a personal key: shown once, stored as a hash with a visible prefix, audited", async () => {
    const r = await researcher();
    const viewer = await r.viewer();
    const { key, secret } = await createApiKey(viewer, { name: "  field laptop  " });
    expect(key).toMatchObject({ name: "field laptop", organizationId: null, revokedAt: null, lastUsedAt: null, canRevoke: true });
    expect(secret.startsWith(key.prefix)).toBe(true);
    const row = await getDb().select().from(apiKeys).where(eq(apiKeys.id, key.id)).get();
    expect(row?.hash).toBe(hashApiKey(secret));
    expect(JSON.stringify(row)).not.toContain(secret.slice(14));
    expect(await findActiveKey(secret)).toMatchObject({ id: key.id, userId: r.id, organizationId: null });
    const events = await getDb().select().from(reviewEvents).where(and(eq(reviewEvents.entityType, "api-key"), eq(reviewEvents.entityId, key.id))).all();
    expect(events.map((e) => e.action)).toEqual(["create"]);
    expect(events[0].actorId).toBe(r.id);
    expect(JSON.stringify(events[0])).not.toContain(secret.slice(14));
  });

  it("revoking works at once, is audited, and cannot be repeated", async () => {
    const r = await researcher();
    const viewer = await r.viewer();
    const { key, secret } = await createApiKey(viewer, { name: "cron job" });
    const revoked = await revokeApiKey(viewer, key.id);
    expect(revoked.revokedAt).not.toBeNull();
    expect(revoked.canRevoke).toBe(false);
    expect(await findActiveKey(secret)).toBeNull();
    await expect(revokeApiKey(viewer, key.id)).rejects.toMatchObject({ status: 409 });
    const actions = (await getDb().select().from(reviewEvents).where(eq(reviewEvents.entityId, key.id)).all()).map((e) => e.action);
    expect(actions.sort()).toEqual(["create", "revoke"]);
  });

  it("holds the plan's number of keys; revoked keys do not count", async () => {
    const r = await researcher();
    const viewer = await r.viewer();
    const max = PLAN_CATALOGUE.researcher.limits.apiKeys;
    const made = [];
    for (let i = 0; i < max; i++) made.push(await createApiKey(viewer, { name: `key ${i}` }));
    await expect(createApiKey(viewer, { name: "one too many" })).rejects.toMatchObject({ status: 409 });
    await revokeApiKey(viewer, made[0].key.id);
    await expect(createApiKey(viewer, { name: "replacement" })).resolves.toBeDefined();
  });

  it("refuses a blank name and the Open plan, writing nothing", async () => {
    const r = await researcher();
    await expect(createApiKey(await r.viewer(), { name: "   " })).rejects.toMatchObject({ name: "ZodError" });
    const open = await person("open");
    const v = await open.viewer();
    expect(keyHolderFor(v)).toMatchObject({ kind: "user", canCreate: false, maxKeys: 0 });
    await expect(createApiKey(v, { name: "x" })).rejects.toMatchObject({ type: "plan-required", status: 403 });
    expect(await getDb().select().from(apiKeys).where(eq(apiKeys.userId, open.id)).all()).toEqual([]);
  });

  it("Institution keys belong to the organisation: the owner makes and revokes them, members see them", async () => {
    const { org, owner, member } = await institution();
    const ownerV = await owner.viewer();
    const memberV = await member.viewer();
    expect(keyHolderFor(ownerV)).toMatchObject({ kind: "organization", organizationId: org.id, canCreate: true, maxKeys: PLAN_CATALOGUE.institution.limits.apiKeys });
    const { key } = await createApiKey(ownerV, { name: "pipeline" });
    expect(key.organizationId).toBe(org.id);
    const seen = await listApiKeys(memberV);
    expect(seen.map((k) => k.id)).toContain(key.id);
    expect(seen.find((k) => k.id === key.id)?.canRevoke).toBe(false);
    await expect(createApiKey(memberV, { name: "mine" })).rejects.toMatchObject({ status: 403 });
    await expect(revokeApiKey(memberV, key.id)).rejects.toMatchObject({ status: 403 });
    // Someone outside the organisation cannot even tell the key exists.
    const stranger = await researcher("stranger");
    await expect(revokeApiKey(await stranger.viewer(), key.id)).rejects.toMatchObject({ status: 404 });
    expect((await listApiKeys(await stranger.viewer())).map((k) => k.id)).not.toContain(key.id);
    await revokeApiKey(ownerV, key.id);
  });
});
