import bcrypt from "bcryptjs";
import { COMMON_PASSWORDS } from "./common-passwords";

// Password policy and hashing (bcrypt, cost BCRYPT_COST). The policy follows
// current practice [trade]: a minimum length, no upper limit below a generous
// maximum, no composition rules, and a refusal of known-common and
// account-derived passwords.

export const PASSWORD_MIN_LENGTH = 10;
/** bcrypt reads at most 72 bytes; longer inputs are refused rather than silently cut. */
export const PASSWORD_MAX_BYTES = 72;
export const BCRYPT_COST = 10;

/** A reason the password is refused, or null when it is acceptable. */
export function passwordProblem(password: string, context: { email?: string; name?: string | null } = {}): string | null {
  if (password.length < PASSWORD_MIN_LENGTH) return `Use at least ${PASSWORD_MIN_LENGTH} characters.`;
  if (Buffer.byteLength(password, "utf8") > PASSWORD_MAX_BYTES) return `Use at most ${PASSWORD_MAX_BYTES} bytes (about 70 plain characters).`;
  const folded = password.toLowerCase().replace(/\s+/g, "");
  if (COMMON_PASSWORDS.has(folded)) return "This password is one of the most commonly used ones. Choose another.";
  if (/^(.)\1+$/.test(folded)) return "A single repeated character is too easy to guess.";
  if (isSequence(folded)) return "A run of consecutive characters is too easy to guess.";
  const stem = folded.replace(/\d+$/, "").replace(/[!?.]+$/, "");
  if (COMMON_PASSWORDS.has(stem)) return "This is a common password with a number added. Choose another.";
  const local = context.email?.split("@")[0]?.toLowerCase();
  if (local && local.length >= 4 && folded.includes(local)) return "Do not use your e-mail address in your password.";
  const name = context.name?.toLowerCase().replace(/\s+/g, "");
  if (name && name.length >= 4 && folded.includes(name)) return "Do not use your name in your password.";
  return null;
}

function isSequence(s: string): boolean {
  if (s.length < 4) return false;
  let up = true;
  let down = true;
  for (let i = 1; i < s.length; i++) {
    const d = s.charCodeAt(i) - s.charCodeAt(i - 1);
    if (d !== 1) up = false;
    if (d !== -1) down = false;
  }
  return up || down;
}

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

// A real hash of a random string, compared against when the account does not
// exist, so a wrong e-mail costs as much time as a wrong password.
let dummyHash: Promise<string> | undefined;
export async function spendEqualTime(password: string): Promise<void> {
  dummyHash ??= bcrypt.hash(`not-a-password-${Math.random()}`, BCRYPT_COST);
  await bcrypt.compare(password, await dummyHash);
}
