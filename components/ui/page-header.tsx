import type { ReactNode } from "react";

export function PageHeader({ title, lead, children }: { title: string; lead?: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-6 border-b border-ink-200 pb-4">
      <h1 className="text-2xl font-semibold text-ink-900 sm:text-3xl">{title}</h1>
      {lead ? <p className="mt-2 max-w-prose text-ink-700">{lead}</p> : null}
      {children}
    </div>
  );
}
