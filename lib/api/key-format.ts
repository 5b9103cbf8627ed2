import { createHash, randomBytes } from "node:crypto";

// The format of Rainprint API keys, and how they are hashed. Pure: no database.
//
//   rp_live_ 7fK2mQ9x… (32 characters of base62, ≈190 bits of randomness)
//   └prefix┘ └──────── secret ────────┘
//
// The key is shown once when it is made; only its SHA-256 (hex) is stored, with
// the first characters (`rp_live_` + 6) as a visible prefix to tell keys apart.
// A fixed, recognisable prefix lets secret scanners and people spot a leaked key.

export const API_KEY_PREFIX = "rp_live_";
export const API_KEY_SECRET_LENGTH = 32;
/** Characters of the key kept in clear (prefix + the first six of the secret). */
export const API_KEY_VISIBLE_LENGTH = API_KEY_PREFIX.length + 6;
export const API_KEY_PATTERN = /^rp_live_[0-9A-Za-z]{32}$/;

const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
// Bytes ≥ 248 (= 4 × 62) are dropped so every character is equally likely.
const UNBIASED_BELOW = 248;

/** A new random key with its visible prefix and hash. */
export function generateApiKey(): { key: string; prefix: string; hash: string } {
  let secret = "";
  while (secret.length < API_KEY_SECRET_LENGTH) {
    for (const b of randomBytes(API_KEY_SECRET_LENGTH * 2)) {
      if (b >= UNBIASED_BELOW) continue;
      secret += ALPHABET[b % 62];
      if (secret.length === API_KEY_SECRET_LENGTH) break;
    }
  }
  const key = API_KEY_PREFIX + secret;
  return { key, prefix: visiblePrefix(key), hash: hashApiKey(key) };
}

/** SHA-256 of the whole key, lower-case hex (what the database stores). */
export function hashApiKey(key: string): string {
  return createHash("sha256").update(key, "utf8").digest("hex");
}

/** The part of a key shown in lists: `rp_live_7fK2mQ`. */
export function visiblePrefix(key: string): string {
  return key.slice(0, API_KEY_VISIBLE_LENGTH);
}

export function isWellFormedApiKey(key: string): boolean {
  return API_KEY_PATTERN.test(key);
}

export type AuthorizationHeader =
  | { kind: "none" }
  | { kind: "bearer"; key: string }
  | { kind: "malformed"; reason: string };

/** Read an `Authorization` header value: absent, a well-formed `Bearer rp_live_…` key, or malformed (with a reason to show). */
export function parseAuthorization(value: string | null | undefined): AuthorizationHeader {
  if (value === null || value === undefined || value.trim() === "") return { kind: "none" };
  const m = /^\s*Bearer\s+(\S+)\s*$/i.exec(value);
  if (!m) return { kind: "malformed", reason: "Send the key as `Authorization: Bearer rp_live_…`." };
  if (!isWellFormedApiKey(m[1]))
    return { kind: "malformed", reason: "This is not a Rainprint API key: keys start with rp_live_ followed by 32 letters and digits." };
  return { kind: "bearer", key: m[1] };
}
