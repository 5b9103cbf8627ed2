import { inject } from "vitest";

// A tiny HTTP client with a cookie jar, for tests that act as a signed-in
// person without a browser. Redirects are not followed (so tests can see them).

export class HttpSession {
  readonly baseUrl: string;
  private cookies = new Map<string, string>();

  constructor(baseUrl: string = inject("baseUrl")) {
    this.baseUrl = baseUrl;
  }

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }

  hasCookie(prefix: string): boolean {
    return [...this.cookies.keys()].some((k) => k.startsWith(prefix));
  }

  private remember(res: Response) {
    for (const c of res.headers.getSetCookie()) {
      const [pair, ...attrs] = c.split(";");
      const eq = pair.indexOf("=");
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*max-age=0/i.test(a) || /^\s*expires=thu, 01 jan 1970/i.test(a));
      if (!value || expired) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }

  /** fetch relative to the app, sending and keeping cookies; never follows redirects. */
  async fetch(path: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set("cookie", this.cookieHeader());
    const res = await fetch(path.startsWith("http") ? path : `${this.baseUrl}${path}`, { ...init, headers, redirect: "manual" });
    this.remember(res);
    return res;
  }

  /** JSON request; returns status, headers and the parsed body (or null). */
  async json<T = Record<string, unknown>>(path: string, method: string, body?: unknown): Promise<{ status: number; headers: Headers; body: T }> {
    const res = await this.fetch(path, {
      method,
      headers: body === undefined ? {} : { "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    let parsed: unknown = null;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      parsed = text;
    }
    return { status: res.status, headers: res.headers, body: parsed as T };
  }

  /** Follow a redirect chain by hand (GET), returning the last response. */
  async follow(path: string, maxHops = 5): Promise<Response> {
    let res = await this.fetch(path);
    for (let i = 0; i < maxHops && res.status >= 300 && res.status < 400; i++) {
      const loc = res.headers.get("location");
      if (!loc) break;
      res = await this.fetch(new URL(loc, this.baseUrl).toString());
    }
    return res;
  }
}

/**
 * Sign in through next-auth's credentials flow: GET /api/auth/csrf, then
 * POST /api/auth/callback/credentials. Returns next-auth's error code
 * ("invalid", "throttled", …) or null on success.
 */
export async function signIn(session: HttpSession, email: string, password: string): Promise<string | null> {
  const csrf = await session.json<{ csrfToken: string }>("/api/auth/csrf", "GET");
  const res = await session.fetch("/api/auth/callback/credentials", {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ csrfToken: csrf.body.csrfToken, email, password, json: "true", callbackUrl: "/account" }),
  });
  const body = (await res.json().catch(() => ({}))) as { url?: string };
  const error = body.url ? new URL(body.url, session.baseUrl).searchParams.get("error") : "no-url";
  if (error) return error;
  return session.hasCookie("next-auth.session-token") ? null : "no-session-cookie";
}

/** A new session signed in as the given account (throws if sign-in fails). */
export async function signedIn(email: string, password: string): Promise<HttpSession> {
  const s = new HttpSession();
  const err = await signIn(s, email, password);
  if (err) throw new Error(`signing in as ${email} failed: ${err}`);
  return s;
}
