// Severity badges and check results in plain words (client-safe).
import type { CheckResult } from "@/lib/qc";

const STYLE = {
  fail: "border-severity-fail/60 bg-red-50 text-severity-fail",
  warn: "border-severity-warn/60 bg-amber-50 text-ink-900",
  note: "border-severity-note/60 bg-blue-50 text-ink-900",
  clean: "border-severity-ok/60 bg-green-50 text-ink-900",
} as const;
const WORDS = { fail: "fails a check", warn: "warning", note: "note", clean: "no findings" } as const;

export function SeverityBadge({ severity }: { severity: "fail" | "warn" | "note" | null | undefined }) {
  const k = severity ?? "clean";
  return <span className={`inline-block whitespace-nowrap rounded border px-1.5 py-0.5 text-xs font-medium ${STYLE[k]}`} data-severity={k}>{WORDS[k]}</span>;
}

export function CheckList({ checks }: { checks: CheckResult[] }) {
  if (!checks.length) return <span className="text-ink-600">No findings.</span>;
  return (
    <ul className="flex flex-col gap-1">
      {checks.map((c, i) => (
        <li key={i} className="text-sm">
          <SeverityBadge severity={c.severity} /> <span className="font-mono text-xs text-ink-600">{c.code}</span> {c.message}
        </li>
      ))}
    </ul>
  );
}
