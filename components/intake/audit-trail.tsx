import type { AuditEntry } from "@/lib/intake/stations";

// The audit trail as a list: when, who, what, before → after, why. Server component.

const WORDS: Record<string, string> = {
  register: "registered the station",
  approve: "approved",
  return: "returned for correction",
  reject: "rejected",
  accept: "accepted",
  submit: "submitted the batch",
  decide: "closed the batch",
  supersede: "replaced by a corrected version",
  resubmit: "submitted a corrected version",
};

const brief = (v: unknown) => (v && typeof v === "object" ? Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== null && typeof x !== "object").map(([k, x]) => `${k}: ${x}`).join(", ") : "");

export function AuditTrail({ entries, labels }: { entries: AuditEntry[]; labels?: Record<string, string> }) {
  if (!entries.length) return <p className="text-ink-600">No events yet.</p>;
  return (
    <ol className="flex flex-col gap-2 text-sm" data-testid="audit-trail">
      {entries.map((e) => (
        <li key={e.id} className="border-l-2 border-ink-300 pl-3" data-action={e.action} data-entity={e.entityType}>
          <span className="text-ink-600">{e.at.slice(0, 16).replace("T", " ")} UTC</span> · <span className="font-medium">{e.actor ?? "system"}</span> · {e.entityType}{" "}
          {labels?.[e.entityId] ?? ""} — {WORDS[e.action] ?? e.action}
          {e.before || e.after ? (
            <span className="block text-xs text-ink-600">
              {e.before ? `before: ${brief(e.before)}` : ""} {e.after ? `after: ${brief(e.after)}` : ""}
            </span>
          ) : null}
          {e.reason ? <span className="block">Reason: {e.reason}</span> : null}
        </li>
      ))}
    </ol>
  );
}
