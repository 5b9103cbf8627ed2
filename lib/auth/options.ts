import "server-only";
import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { eq } from "drizzle-orm";
import type { NextAuthOptions } from "next-auth";
import type { Adapter } from "next-auth/adapters";
import CredentialsProvider from "next-auth/providers/credentials";
import EmailProvider from "next-auth/providers/email";
import { getDb } from "@/db";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { env } from "@/lib/env";
import { queueMail } from "@/lib/mail";
import { normalizeEmail } from "./email";
import { spendEqualTime, verifyPassword } from "./password";
import { clearFailures, lockedForSeconds, recordFailure, throttleKeys } from "./throttle";

// next-auth 4 configuration: JWT sessions (the cookie carries only the user
// id; lib/auth/guard.ts reads everything else from the database), the
// Drizzle adapter over our tables (used for magic-link tokens), e-mail +
// password, and e-mail magic links for existing accounts only.

export const MAGIC_LINK_MINUTES = 15;

/** First address in X-Forwarded-For (set by Next or the proxy in front), else "unknown". */
export function clientAddress(headers: Headers | Record<string, string | string[] | undefined> | undefined): string {
  const get = (k: string) => {
    if (!headers) return undefined;
    if (headers instanceof Headers) return headers.get(k) ?? undefined;
    const v = headers[k];
    return Array.isArray(v) ? v[0] : v;
  };
  const xff = get("x-forwarded-for")?.split(",")[0]?.trim();
  return xff || get("x-real-ip") || "unknown";
}

/**
 * The adapter, created on first use so importing this module opens no
 * database. next-auth copies the adapter's methods (Object.keys), so the
 * proxy also reports the real adapter's keys.
 */
function lazyAdapter(): Adapter {
  let made: Adapter | undefined;
  const real = () => (made ??= adapter());
  return new Proxy({} as Adapter, {
    get: (_target, prop) => Reflect.get(real(), prop),
    has: (_target, prop) => Reflect.has(real(), prop),
    ownKeys: () => Reflect.ownKeys(real()),
    getOwnPropertyDescriptor: (_target, prop) => {
      const d = Reflect.getOwnPropertyDescriptor(real(), prop);
      return d ? { ...d, configurable: true } : undefined;
    },
  });
}

function adapter(): Adapter {
  // @auth/drizzle-adapter speaks the @auth/core adapter interface, which is
  // call-compatible with next-auth 4's for the methods next-auth 4 uses.
  return DrizzleAdapter(getDb(), {
    usersTable: users,
    accountsTable: accounts,
    sessionsTable: sessions,
    verificationTokensTable: verificationTokens,
  } as never) as unknown as Adapter;
}

async function findUserByEmail(email: string) {
  return getDb()
    .select({ id: users.id, email: users.email, name: users.name, passwordHash: users.passwordHash, emailVerified: users.emailVerified, disabledAt: users.disabledAt })
    .from(users)
    .where(eq(users.email, email))
    .get();
}

export const authOptions: NextAuthOptions = {
  adapter: lazyAdapter(),
  session: { strategy: "jwt", maxAge: 30 * 24 * 3600 },
  get secret() {
    return env().NEXTAUTH_SECRET;
  },
  pages: { signIn: "/sign-in", verifyRequest: "/sign-in/check-email", error: "/sign-in", signOut: "/sign-out" },
  providers: [
    CredentialsProvider({
      id: "credentials",
      name: "E-mail and password",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        const email = normalizeEmail(String(credentials?.email ?? ""));
        const password = String(credentials?.password ?? "");
        const keys = throttleKeys(email, clientAddress(req?.headers as Record<string, string> | undefined));
        if ((await lockedForSeconds(keys)) > 0) throw new Error("throttled");
        const user = email && password ? await findUserByEmail(email) : undefined;
        const ok = user?.passwordHash ? await verifyPassword(password, user.passwordHash) : (await spendEqualTime(password), false);
        // Wrong password, unknown address, unverified or disabled account: one answer for all.
        if (!user || !ok || !user.emailVerified || user.disabledAt) {
          await recordFailure(keys);
          throw new Error("invalid");
        }
        await clearFailures(keys);
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
    EmailProvider({
      maxAge: MAGIC_LINK_MINUTES * 60,
      normalizeIdentifier: normalizeEmail,
      // Sends only to existing, enabled accounts; the page says the same either way.
      async sendVerificationRequest({ identifier, url }) {
        const user = await findUserByEmail(normalizeEmail(identifier));
        if (!user || user.disabledAt) return;
        await queueMail({ to: user.email, template: "magic-link", data: { url, expiresMinutes: MAGIC_LINK_MINUTES } });
      },
    }),
  ],
  callbacks: {
    async signIn({ user, account, email }) {
      if (account?.provider !== "email") return true;
      // The link request itself: always "sent" (sendVerificationRequest decides).
      if (email?.verificationRequest) return true;
      // Following a link: only an existing, enabled account may sign in; never create one.
      const row = user.email ? await findUserByEmail(normalizeEmail(user.email)) : undefined;
      if (!row || row.disabledAt || row.id !== user.id) return false;
      return true;
    },
    async jwt({ token, user }) {
      if (user?.id) token.sub = user.id;
      return token;
    },
    async session({ session, token }) {
      // Only the id travels; the guard loads the rest from the database.
      if (session.user && token.sub) session.user.id = token.sub;
      return session;
    },
  },
  events: {
    // A magic link proves the address: mark it verified.
    async signIn({ user, account }) {
      if (account?.provider === "email" && user.id) {
        await getDb().update(users).set({ emailVerified: new Date() }).where(eq(users.id, user.id));
      }
    },
  },
  logger: {
    error(code, metadata) {
      if (env().NODE_ENV !== "test") console.error("[next-auth]", code, metadata instanceof Error ? metadata.message : "");
    },
    warn() {},
    debug() {},
  },
};
