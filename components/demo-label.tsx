// The label shown wherever invented demo data appears. Keep the words
// "synthetic demo data": tests and people look for them.

export function DemoLabel({ what, className }: { what?: string; className?: string }) {
  return (
    <p
      role="note"
      data-demo-label
      className={`inline-flex items-center gap-2 rounded border border-dashed border-ink-400 bg-ink-50 px-2 py-1 text-xs font-medium text-ink-700 ${className ?? ""}`}
    >
      <span aria-hidden="true" className="inline-block h-2 w-2 rounded-full bg-ink-400" />
      synthetic demo data{what ? ` — ${what}` : ""}: invented for demonstration, not real measurements
    </p>
  );
}
