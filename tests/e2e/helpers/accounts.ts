import demo from "../../../db/seed/demo-accounts.json";

export type DemoKey = "admin" | "moderator" | "contributor" | "newcomer" | "researcher" | "institution";

/** A demo account from db/seed/demo-accounts.json (synthetic demo data). */
export function demoAccount(key: DemoKey): { email: string; password: string; name: string; role: string } {
  const a = demo.accounts.find((x) => x.key === key);
  if (!a) throw new Error(`no demo account ${key}`);
  return a;
}

let n = 0;
/** A fresh, unique e-mail address for a test. */
export function freshEmail(label = "person"): string {
  n += 1;
  return `${label}-${Date.now().toString(36)}-${n}@tests.example`;
}
