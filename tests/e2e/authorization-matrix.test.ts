import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { demoAccount } from "./helpers/accounts";
import { HttpSession, signedIn } from "./helpers/http";
import { PRINCIPALS, POLICY, type Outcome, type Principal } from "./policy";

// Every page and route handler under app/, checked against tests/e2e/policy.ts
// for every principal. A route file without a policy entry fails the suite.

const ROUTE_FILE = /^(page|route)\.(tsx?|jsx?|mdx)$/;

function discover(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) out.push(...discover(p));
    else if (ROUTE_FILE.test(name)) out.push(path.relative(process.cwd(), p).split(path.sep).join("/"));
  }
  return out;
}

/** HTTP methods a route.ts exports (export const GET / export async function POST / export { x as GET }). */
function exportedMethods(file: string): string[] {
  const src = readFileSync(file, "utf8");
  const found = new Set<string>();
  for (const m of src.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)\b/g)) found.add(m[1]);
  for (const m of src.matchAll(/\bas\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)\b/g)) found.add(m[1]);
  return [...found].sort();
}

const files = discover("app");
const sessions = {} as Record<Principal, HttpSession>;

beforeAll(async () => {
  for (const [name, p] of Object.entries(PRINCIPALS) as [Principal, (typeof PRINCIPALS)[Principal]][]) {
    if (!p) {
      sessions[name] = new HttpSession();
      continue;
    }
    const a = demoAccount(p.account);
    sessions[name] = await signedIn(a.email, a.password);
    // The demo account really has the role and plan the column stands for.
    const me = await sessions[name].json<{ role: string; plan: string }>("/api/me", "GET");
    expect(me.body, `${name} demo account`).toMatchObject({ role: p.role, plan: p.plan });
  }
});

describe("the authorization policy covers every route", () => {
  it("finds the route files", () => {
    expect(files.length).toBeGreaterThan(10);
    expect(files).toContain("app/page.tsx");
  });

  it("has an entry for every page and route handler under app/", () => {
    const covered = new Set(POLICY.map((e) => e.file));
    expect(files.filter((f) => !covered.has(f)), "route files without a policy entry in tests/e2e/policy.ts").toEqual([]);
    expect(POLICY.map((e) => e.file).filter((f) => !files.includes(f)), "policy entries for files that do not exist").toEqual([]);
  });

  it("has an entry for every HTTP method each route handler exports", () => {
    const missing: string[] = [];
    for (const f of files.filter((x) => /\/route\.\w+$/.test(x))) {
      const listed = new Set<string>(POLICY.filter((e) => e.file === f).map((e) => e.method ?? "GET"));
      for (const m of exportedMethods(f)) if (!listed.has(m)) missing.push(`${m} ${f}`);
    }
    expect(missing).toEqual([]);
  });
});

function describeOutcome(res: Response): string {
  const loc = res.headers.get("location");
  return loc ? `${res.status} → ${new URL(loc, "http://x").pathname}` : String(res.status);
}

function matches(res: Response, want: Outcome): boolean {
  if (typeof want === "number") return res.status === want;
  const loc = res.headers.get("location");
  return res.status >= 300 && res.status < 400 && !!loc && new URL(loc, "http://x").pathname.startsWith(want.redirect);
}

describe("every route answers every principal as the policy says", () => {
  for (const entry of POLICY) {
    const method = entry.method ?? "GET";
    it(`${method} ${entry.url}`, async () => {
      const got: Record<string, string> = {};
      const want: Record<string, string> = {};
      for (const principal of Object.keys(PRINCIPALS) as Principal[]) {
        const res = await sessions[principal].fetch(entry.url, {
          method,
          headers: entry.body === undefined ? {} : { "content-type": "application/json" },
          body: entry.body === undefined ? undefined : JSON.stringify(entry.body),
        });
        await res.arrayBuffer();
        const expected = entry.expect[principal];
        want[principal] = typeof expected === "number" ? String(expected) : `3xx → ${expected.redirect}`;
        got[principal] = matches(res, expected) ? want[principal] : describeOutcome(res);
      }
      expect(got).toEqual(want);
    });
  }
});
