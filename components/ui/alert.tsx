import type { ReactNode } from "react";

const TONES = {
  info: "border-severity-note/50 bg-blue-50 text-ink-900",
  success: "border-severity-ok/50 bg-green-50 text-ink-900",
  error: "border-severity-fail/50 bg-red-50 text-ink-900",
  warn: "border-severity-warn/50 bg-amber-50 text-ink-900",
} as const;

/** A message box. Errors and successes are announced to screen readers. */
export function Alert({ tone = "info", title, children }: { tone?: keyof typeof TONES; title?: string; children?: ReactNode }) {
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`rounded border px-4 py-3 text-sm ${TONES[tone]}`}>
      {title ? <p className="font-semibold">{title}</p> : null}
      {children ? <div className={title ? "mt-1" : undefined}>{children}</div> : null}
    </div>
  );
}
