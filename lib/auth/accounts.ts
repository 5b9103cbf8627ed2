import "server-only";
import { eq } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { reviewEvents, users } from "@/db/schema";
import { AppError, errors } from "@/lib/errors";
import { env } from "@/lib/env";
import { queueMail } from "@/lib/mail";
import { emailSchema } from "./email";
import { hashPassword, passwordProblem, spendEqualTime, verifyPassword } from "./password";
import { consumeAuthToken, createAuthToken, retireTokens, TOKEN_TTL_MS } from "./tokens";

// Our own account flows: sign-up with e-mail confirmation, resend of the
// confirmation, password reset by e-mail, password change, profile. Each
// request that names an address answers the same whether or not an account
// exists (see NEUTRAL_MAIL_SENT); the e-mail itself tells the owner.

export const nameSchema = z.string().trim().min(1, "Enter your name.").max(120, "Use at most 120 characters.");
export const affiliationSchema = z.string().trim().max(200, "Use at most 200 characters.").optional().or(z.literal("").transform(() => undefined));
export const passwordSchema = z.string({ error: "Enter a password." }).min(1, "Enter a password.").max(200, "Use at most 72 bytes.");
export const tokenSchema = z.string().trim().min(16, "This link is not valid.").max(200, "This link is not valid.");

export const signUpInput = z.object({ name: nameSchema, email: emailSchema, password: passwordSchema, affiliation: affiliationSchema });
export const emailOnlyInput = z.object({ email: emailSchema });
export const resetInput = z.object({ token: tokenSchema, password: passwordSchema });
export const verifyInput = z.object({ token: tokenSchema });
export const changePasswordInput = z.object({ currentPassword: z.string().min(1, "Enter your current password."), newPassword: passwordSchema });
export const profileInput = z.object({ name: nameSchema, affiliation: affiliationSchema });

function weakPassword(password: string, ctx: { email?: string; name?: string | null }, field = "password"): void {
  const problem = passwordProblem(password, ctx);
  if (problem) throw errors.invalid("Choose a stronger password.", { [field]: [problem] });
}

function link(path: string, token: string): string {
  return `${env().APP_URL}${path}?token=${encodeURIComponent(token)}`;
}

/**
 * Sign up. New address: a contributor account (unconfirmed) and a
 * confirmation e-mail. Known address: no change, and a note to the owner.
 * The caller answers NEUTRAL_MAIL_SENT in both cases.
 */
export async function signUp(input: z.infer<typeof signUpInput>): Promise<void> {
  weakPassword(input.password, { email: input.email, name: input.name });
  const db = getDb();
  const existing = await db.select({ id: users.id, emailVerified: users.emailVerified, name: users.name }).from(users).where(eq(users.email, input.email)).get();
  if (existing) {
    await spendEqualTime(input.password);
    if (!existing.emailVerified) {
      // Not confirmed yet: send a fresh confirmation link instead.
      await sendVerification(existing.id, input.email, existing.name);
      return;
    }
    await queueMail({
      to: input.email,
      template: "account-exists",
      data: { signInUrl: `${env().APP_URL}/sign-in`, resetUrl: `${env().APP_URL}/reset-password` },
    });
    return;
  }
  const passwordHash = await hashPassword(input.password);
  await db.transaction(async (t) => {
    const tx = t as unknown as Db;
    const user = await tx
      .insert(users)
      .values({ email: input.email, name: input.name, affiliation: input.affiliation ?? null, passwordHash, role: "contributor" })
      .onConflictDoNothing()
      .returning({ id: users.id })
      .get();
    if (!user) return; // a parallel sign-up with the same address won
    const { token } = await createAuthToken(user.id, "verify-email", { db: tx });
    await queueMail(
      { to: input.email, template: "verify-email", data: { name: input.name, url: link("/verify", token), expiresHours: TOKEN_TTL_MS["verify-email"] / 3600_000 } },
      tx,
    );
  });
}

async function sendVerification(userId: string, email: string, name: string | null): Promise<void> {
  await getDb().transaction(async (t) => {
    const tx = t as unknown as Db;
    const { token } = await createAuthToken(userId, "verify-email", { db: tx });
    await queueMail({ to: email, template: "verify-email", data: { name, url: link("/verify", token), expiresHours: TOKEN_TTL_MS["verify-email"] / 3600_000 } }, tx);
  });
}

/** Send a new confirmation link if the address belongs to an unconfirmed account; silent otherwise. */
export async function resendVerification(email: string): Promise<void> {
  const user = await getDb().select({ id: users.id, name: users.name, emailVerified: users.emailVerified, disabledAt: users.disabledAt }).from(users).where(eq(users.email, email)).get();
  if (!user || user.emailVerified || user.disabledAt) return;
  await sendVerification(user.id, email, user.name);
}

/** Confirm an address from its link. */
export async function verifyEmail(token: string): Promise<{ email: string }> {
  const { userId } = await consumeAuthToken(token, "verify-email");
  const row = await getDb().update(users).set({ emailVerified: new Date() }).where(eq(users.id, userId)).returning({ email: users.email }).get();
  if (!row) throw new AppError("link-invalid", { detail: "This link belongs to an account that no longer exists." });
  await retireTokens(userId, "verify-email");
  return { email: row.email };
}

/** Send a reset link to an existing, enabled account; silent otherwise. */
export async function requestPasswordReset(email: string): Promise<void> {
  const user = await getDb().select({ id: users.id, name: users.name, disabledAt: users.disabledAt }).from(users).where(eq(users.email, email)).get();
  if (!user || user.disabledAt) return;
  await getDb().transaction(async (t) => {
    const tx = t as unknown as Db;
    const { token } = await createAuthToken(user.id, "reset-password", { db: tx });
    await queueMail(
      { to: email, template: "password-reset", data: { name: user.name, url: link("/reset-password/new", token), expiresMinutes: TOKEN_TTL_MS["reset-password"] / 60_000 } },
      tx,
    );
  });
}

/** Set a new password from a reset link. The link also confirms the address. */
export async function resetPassword(input: z.infer<typeof resetInput>): Promise<void> {
  // Check strength before using up the link, so a weak choice can be corrected with the same link.
  weakPassword(input.password, {});
  const { userId } = await consumeAuthToken(input.token, "reset-password");
  const user = await getDb().select({ email: users.email, name: users.name, emailVerified: users.emailVerified }).from(users).where(eq(users.id, userId)).get();
  if (!user) throw new AppError("link-invalid", { detail: "This link belongs to an account that no longer exists." });
  const passwordHash = await hashPassword(input.password);
  await getDb()
    .update(users)
    .set({ passwordHash, emailVerified: user.emailVerified ?? new Date() })
    .where(eq(users.id, userId));
  await retireTokens(userId, "reset-password");
}

export async function changePassword(userId: string, input: z.infer<typeof changePasswordInput>): Promise<void> {
  const user = await getDb().select({ email: users.email, name: users.name, passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId)).get();
  if (!user) throw errors.unauthenticated();
  const ok = user.passwordHash ? await verifyPassword(input.currentPassword, user.passwordHash) : false;
  if (!ok) throw errors.invalid("Your current password was not accepted.", { currentPassword: ["This is not your current password."] });
  weakPassword(input.newPassword, { email: user.email, name: user.name }, "newPassword");
  await getDb().update(users).set({ passwordHash: await hashPassword(input.newPassword) }).where(eq(users.id, userId));
}

export async function updateProfile(userId: string, input: z.infer<typeof profileInput>): Promise<void> {
  const db = getDb();
  const before = await db.select({ name: users.name, affiliation: users.affiliation }).from(users).where(eq(users.id, userId)).get();
  if (!before) throw errors.unauthenticated();
  await db.transaction(async (t) => {
    const tx = t as unknown as Db;
    await tx.update(users).set({ name: input.name, affiliation: input.affiliation ?? null }).where(eq(users.id, userId));
    await tx.insert(reviewEvents).values({
      actorId: userId,
      entityType: "user",
      entityId: userId,
      action: "profile-updated",
      before,
      after: { name: input.name, affiliation: input.affiliation ?? null },
    });
  });
}

export async function getProfile(userId: string) {
  return getDb().select({ name: users.name, affiliation: users.affiliation, createdAt: users.createdAt }).from(users).where(eq(users.id, userId)).get();
}
