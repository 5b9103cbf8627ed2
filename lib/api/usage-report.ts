import "server-only";
import type { Viewer } from "@/lib/auth/guard";
import { listApiKeys } from "./keys";
import { meterLimit, utcDay } from "./quota";
import { flushUsage, usageRows } from "./usage";

// The usage page's numbers: quota units per UTC day for the viewer's quota
// (their organisation's on Institution, else their own), split by key, with
// what no key accounts for (the app's own pages, signed in) as its own series.

export type UsageSeries = { id: string; label: string; values: number[]; revoked: boolean };

export type UsageReport = {
  /** "organization" when the quota is the organisation's. */
  scope: "account" | "organization";
  scopeName: string;
  dailyLimit: number;
  usedToday: number;
  days: string[];
  series: UsageSeries[];
  totals: number[];
};

export async function usageReportFor(viewer: Viewer, opts: { days?: number; now?: Date } = {}): Promise<UsageReport> {
  const now = opts.now ?? new Date();
  const n = opts.days ?? 30;
  const days = Array.from({ length: n }, (_, i) => utcDay(new Date(now.getTime() - (n - 1 - i) * 86_400_000)));
  const org = viewer.plan === "institution" ? viewer.planOrganizationId : null;
  const subject = org ? `org:${org}` : `user:${viewer.id}`;
  const keys = (await listApiKeys(viewer)).filter((k) => k.organizationId === org);
  await flushUsage();
  const rows = await usageRows([subject, ...keys.map((k) => `key:${k.id}`)], days[0], days[n - 1]);
  const at = new Map(rows.map((r) => [`${r.subject}|${r.day}`, r.count]));
  const valuesOf = (s: string) => days.map((d) => at.get(`${s}|${d}`) ?? 0);
  const totals = valuesOf(subject);
  const series: UsageSeries[] = keys
    .map((k) => ({ id: k.id, label: `${k.name} (${k.prefix}…)`, values: valuesOf(`key:${k.id}`), revoked: k.revokedAt !== null }))
    .filter((s) => !s.revoked || s.values.some((v) => v > 0));
  const keyed = days.map((_, i) => series.reduce((sum, s) => sum + s.values[i], 0));
  series.push({ id: "no-key", label: "Without a key (signed in)", values: totals.map((t, i) => Math.max(0, t - keyed[i])), revoked: false });
  return {
    scope: org ? "organization" : "account",
    scopeName: org ? (viewer.organizations.find((o) => o.id === org)?.name ?? "your organisation") : "your account",
    dailyLimit: meterLimit(viewer.plan, "requests") ?? 0,
    usedToday: totals[n - 1],
    days,
    series,
    totals,
  };
}
