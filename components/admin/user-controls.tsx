"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { sendJson } from "@/lib/client-fetch";

const ROLES = ["contributor", "moderator", "admin"] as const;

/** Role selector and enable/disable for one row of the users table. */
export function UserControls({ id, email, role, disabled, self }: { id: string; email: string; role: string; disabled: boolean; self: boolean }) {
  const router = useRouter();
  const [msg, setMsg] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  async function patch(body: Record<string, unknown>) {
    setBusy(true);
    setMsg(null);
    const r = await sendJson(`/api/admin/users/${id}`, body, "PATCH");
    setBusy(false);
    if (r.ok) {
      setMsg({ tone: "ok", text: "Saved." });
      router.refresh();
    } else setMsg({ tone: "error", text: r.problem.detail ?? r.problem.title });
  }
  if (self) return <span className="text-xs text-ink-600">This is you</span>;
  return (
    <div className="flex flex-wrap items-center gap-2">
      <label className="sr-only" htmlFor={`role-${id}`}>
        Role of {email}
      </label>
      <select
        id={`role-${id}`}
        defaultValue={role}
        disabled={busy}
        onChange={(e) => void patch({ role: e.target.value })}
        className="rounded border border-ink-300 bg-white px-2 py-1 text-sm"
      >
        {ROLES.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </select>
      <button
        type="button"
        disabled={busy}
        onClick={() => void patch({ disabled: !disabled })}
        className="rounded border border-ink-300 bg-white px-2 py-1 text-sm hover:bg-ink-50"
      >
        {disabled ? "Enable" : "Disable"}
        <span className="sr-only"> {email}</span>
      </button>
      {msg ? (
        <span role={msg.tone === "error" ? "alert" : "status"} className={msg.tone === "error" ? "text-xs text-severity-fail" : "text-xs text-severity-ok"}>
          {msg.text}
        </span>
      ) : null}
    </div>
  );
}
