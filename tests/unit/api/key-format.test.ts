import { describe, expect, it } from "vitest";
import { API_KEY_PATTERN, generateApiKey, hashApiKey, isWellFormedApiKey, parseAuthorization, visiblePrefix } from "@/lib/api/key-format";

describe("API key format", () => {
  it("makes rp_live_ keys of 32 base62 characters, a visible prefix and the SHA-256 of the whole key", () => {
    const { key, prefix, hash } = generateApiKey();
    expect(key).toMatch(API_KEY_PATTERN);
    expect(prefix).toBe(key.slice(0, 14));
    expect(prefix.startsWith("rp_live_")).toBe(true);
    expect(hash).toBe(hashApiKey(key));
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    expect(hash).not.toContain(key.slice(8));
  });

  it("hashes with SHA-256", () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc") [pub]
    expect(hashApiKey("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("never repeats a key and uses the whole alphabet about evenly", () => {
    const keys = Array.from({ length: 2000 }, () => generateApiKey().key);
    expect(new Set(keys).size).toBe(keys.length);
    const counts = new Map<string, number>();
    for (const k of keys) for (const ch of k.slice(8)) counts.set(ch, (counts.get(ch) ?? 0) + 1);
    expect(counts.size).toBe(62);
    // 64,000 characters over 62 symbols: ~1032 each, sd ~32; a biased generator (b % 62 over all 256 bytes)
    // would give the first 8 symbols ~1.2× the others.
    const values = [...counts.values()];
    expect(Math.max(...values) / Math.min(...values)).toBeLessThan(1.4);
  });

  it("reads the Authorization header", () => {
    const { key } = generateApiKey();
    expect(parseAuthorization(null)).toEqual({ kind: "none" });
    expect(parseAuthorization("")).toEqual({ kind: "none" });
    expect(parseAuthorization(`Bearer ${key}`)).toEqual({ kind: "bearer", key });
    expect(parseAuthorization(`bearer   ${key} `)).toEqual({ kind: "bearer", key });
    expect(parseAuthorization(`Basic ${key}`).kind).toBe("malformed");
    expect(parseAuthorization("Bearer rp_live_short").kind).toBe("malformed");
    expect(parseAuthorization(`Bearer ${key}x`).kind).toBe("malformed");
    expect(parseAuthorization(`Bearer ${key} extra`).kind).toBe("malformed");
    expect(isWellFormedApiKey(key.replace("rp_live_", "rp_test_"))).toBe(false);
    expect(visiblePrefix(key)).toHaveLength(14);
  });
});
