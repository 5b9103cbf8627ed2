import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { getClient } from "@/db";
import { consumeUsage, flushUsage, peekUsage, resetUsageMemory, usageRows } from "@/lib/api/usage";
import { resetEnvCache } from "@/lib/env";
import { freshDb } from "../helpers/db";

beforeAll(freshDb);

function setFlushMs(ms: number) {
  process.env.API_USAGE_FLUSH_MS = String(ms);
  resetEnvCache();
  resetUsageMemory();
}

afterEach(() => {
  delete process.env.API_USAGE_FLUSH_MS;
  resetEnvCache();
  resetUsageMemory();
});

const NOW = new Date("2026-12-02T10:00:00Z");

async function stored(subject: string, day = "2026-12-02"): Promise<number | null> {
  const rs = await getClient().execute({ sql: "SELECT count FROM api_usage WHERE subject = ? AND day = ?", args: [subject, day] });
  return rs.rows.length ? Number(rs.rows[0].count) : null;
}

describe("usage counting", () => {
  it("counts up to the limit and refuses the next request without counting it (written through)", async () => {
    setFlushMs(0);
    for (let i = 1; i <= 3; i++) {
      const r = await consumeUsage([{ subject: "anon:198.51.100.1", cost: 1, limit: 3 }], NOW);
      expect(r).toEqual({ ok: true, used: [i], refused: [] });
    }
    const refused = await consumeUsage([{ subject: "anon:198.51.100.1", cost: 1, limit: 3 }], NOW);
    expect(refused).toEqual({ ok: false, used: [3], refused: [0] });
    expect(await stored("anon:198.51.100.1")).toBe(3);
  });

  it("is all-or-nothing over several charges", async () => {
    setFlushMs(0);
    await consumeUsage([{ subject: "lookups:user:a", cost: 2, limit: 2 }], NOW);
    const r = await consumeUsage(
      [
        { subject: "user:a", cost: 1, limit: 100 },
        { subject: "lookups:user:a", cost: 1, limit: 2 },
        { subject: "key:k1", cost: 1, limit: null },
      ],
      NOW,
    );
    expect(r.ok).toBe(false);
    expect(r.refused).toEqual([1]);
    expect(await stored("user:a")).toBeNull();
    expect(await stored("key:k1")).toBeNull();
  });

  it("a cost larger than what is left is refused even on a fresh day", async () => {
    setFlushMs(0);
    const r = await consumeUsage([{ subject: "user:big", cost: 11, limit: 10 }], NOW);
    expect(r.ok).toBe(false);
    expect(await stored("user:big")).toBeNull();
  });

  it("keeps counts in memory and writes them in one go after the flush interval", async () => {
    setFlushMs(60_000);
    const grants = await Promise.all(Array.from({ length: 25 }, () => consumeUsage([{ subject: "org:o1", cost: 1, limit: 20 }], NOW)));
    // 25 concurrent requests, 20 allowed: exactly 20 granted, none twice.
    expect(grants.filter((g) => g.ok)).toHaveLength(20);
    expect(grants.filter((g) => g.ok).map((g) => g.used[0]).sort((a, b) => a - b)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    expect(await stored("org:o1")).toBeNull();
    expect(await peekUsage(["org:o1"], NOW)).toEqual([20]);
    await flushUsage();
    expect(await stored("org:o1")).toBe(20);
    await flushUsage();
    expect(await stored("org:o1")).toBe(20);
  });

  it("adds to what another app instance counted, and sees it after a flush", async () => {
    setFlushMs(60_000);
    await consumeUsage([{ subject: "org:shared", cost: 5, limit: 100 }], NOW);
    // Another instance writes 30 meanwhile.
    await getClient().execute("INSERT INTO api_usage (subject, day, count) VALUES ('org:shared', '2026-12-02', 30) ON CONFLICT (subject, day) DO UPDATE SET count = count + 30");
    await flushUsage();
    expect(await stored("org:shared")).toBe(35);
    expect(await peekUsage(["org:shared"], NOW)).toEqual([35]);
  });

  it("reads the stored count for a subject it has not seen, and starts a new count each UTC day", async () => {
    setFlushMs(0);
    await getClient().execute("INSERT INTO api_usage (subject, day, count) VALUES ('user:seen', '2026-12-02', 9)");
    expect((await consumeUsage([{ subject: "user:seen", cost: 1, limit: 10 }], NOW)).used).toEqual([10]);
    expect((await consumeUsage([{ subject: "user:seen", cost: 1, limit: 10 }], NOW)).ok).toBe(false);
    const tomorrow = new Date("2026-12-03T00:00:01Z");
    expect((await consumeUsage([{ subject: "user:seen", cost: 1, limit: 10 }], tomorrow)).used).toEqual([1]);
    expect(await stored("user:seen", "2026-12-03")).toBe(1);
    const rows = await usageRows(["user:seen"], "2026-12-01", "2026-12-31");
    expect(rows.sort((a, b) => a.day.localeCompare(b.day))).toEqual([
      { subject: "user:seen", day: "2026-12-02", count: 10 },
      { subject: "user:seen", day: "2026-12-03", count: 1 },
    ]);
  });
});
