import Link from "next/link";

/** Monthly / yearly switch as two links (works without JavaScript). */
export function IntervalToggle({ interval, basePath }: { interval: "month" | "year"; basePath: string }) {
  const item = (value: "month" | "year", label: string) => (
    <Link
      href={value === "month" ? basePath : `${basePath}?interval=year`}
      aria-current={interval === value ? "true" : undefined}
      className={`rounded px-4 py-2 text-sm font-medium ${interval === value ? "bg-tarn-700 text-white" : "text-ink-800 hover:bg-ink-100"}`}
      scroll={false}
    >
      {label}
    </Link>
  );
  return (
    <nav aria-label="Billing interval" className="inline-flex gap-1 rounded border border-ink-200 bg-white p-1">
      {item("month", "Monthly")}
      {item("year", "Yearly — two months free")}
    </nav>
  );
}
