"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

// The keys page: make a key (the secret is shown once), see every key you can
// see with its last use, revoke the ones you manage. Plain data in, JSON
// requests out; the server decides who may do what.

export type KeyRow = {
  id: string;
  name: string;
  prefix: string;
  organizationName: string | null;
  createdBy: string | null;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  canRevoke: boolean;
};

const when = (iso: string | null) =>
  iso ? new Date(iso).toLocaleString("en-GB", { timeZone: "UTC", dateStyle: "medium", timeStyle: "short" }) + " UTC" : null;

export function NewKeyForm({ target }: { target: string }) {
  const f = useFormSend<{ secret: string; key: KeyRow; message: string }>();
  const router = useRouter();
  const [copied, setCopied] = useState(false);
  return (
    <div className="flex flex-col gap-4">
      <form
        noValidate
        className="flex max-w-md flex-col gap-3"
        onSubmit={async (e) => {
          e.preventDefault();
          const form = e.currentTarget;
          const name = String(new FormData(form).get("name") ?? "");
          setCopied(false);
          const ok = await f.send("/api/account/api-keys", { name });
          if (ok) {
            form.reset();
            router.refresh();
          }
        }}
      >
        {f.message ? <Alert tone="error">{f.message}</Alert> : null}
        <Field label="Key name" name="name" hint={`Say where the key will be used, e.g. “nightly model run”. The key will belong to ${target}.`} maxLength={60} required errors={f.fieldErrors("name")} />
        <div>
          <Button type="submit" disabled={f.pending}>
            Make key
          </Button>
        </div>
      </form>
      {f.data ? (
        <Alert tone="success" title={`Key “${f.data.key.name}” is ready`}>
          <p>{f.data.message}</p>
          <div className="mt-2 flex flex-wrap items-center gap-2">
            <label htmlFor="new-key-secret" className="sr-only">
              The new key
            </label>
            <input
              id="new-key-secret"
              data-testid="new-key-secret"
              readOnly
              value={f.data.secret}
              onFocus={(e) => e.currentTarget.select()}
              className="w-full max-w-xl rounded border border-ink-300 bg-white px-2 py-1 font-mono text-sm"
            />
            <Button
              type="button"
              kind="secondary"
              onClick={async () => {
                await navigator.clipboard?.writeText(f.data!.secret).catch(() => {});
                setCopied(true);
              }}
            >
              {copied ? "Copied" : "Copy"}
            </Button>
          </div>
          <p className="mt-2 text-xs">Use it as <code className="font-mono">Authorization: Bearer {f.data.key.prefix}…</code></p>
        </Alert>
      ) : null}
    </div>
  );
}

export function KeyTable({ keys }: { keys: KeyRow[] }) {
  const router = useRouter();
  const [confirming, setConfirming] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ tone: "success" | "error"; text: string } | null>(null);
  if (!keys.length) return <p className="text-ink-700">No keys yet.</p>;
  async function revoke(id: string) {
    setPending(true);
    const r = await sendJson<{ message: string }>(`/api/account/api-keys/${encodeURIComponent(id)}`, {}, "DELETE");
    setPending(false);
    setConfirming(null);
    setMessage(r.ok ? { tone: "success", text: r.data.message } : { tone: "error", text: problemMessage(r.problem) });
    router.refresh();
  }
  return (
    <div className="flex flex-col gap-3">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[44rem] text-left text-sm" data-testid="api-keys-table">
          <thead className="border-b border-ink-300 text-ink-700">
            <tr>
              <th scope="col" className="py-2 pr-3 font-medium">Name</th>
              <th scope="col" className="py-2 pr-3 font-medium">Key starts with</th>
              <th scope="col" className="py-2 pr-3 font-medium">Belongs to</th>
              <th scope="col" className="py-2 pr-3 font-medium">Made</th>
              <th scope="col" className="py-2 pr-3 font-medium">Last used</th>
              <th scope="col" className="py-2 pr-3 font-medium">State</th>
              <th scope="col" className="py-2 font-medium"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody>
            {keys.map((k) => (
              <tr key={k.id} className="border-b border-ink-100 align-top" data-key-name={k.name}>
                <td className="py-2 pr-3 font-medium">{k.name}</td>
                <td className="py-2 pr-3 font-mono">{k.prefix}…</td>
                <td className="py-2 pr-3">{k.organizationName ?? "You"}</td>
                <td className="py-2 pr-3">
                  {when(k.createdAt)}
                  {k.createdBy ? <span className="block text-xs text-ink-600">by {k.createdBy}</span> : null}
                </td>
                <td className="py-2 pr-3" data-testid="key-last-used">{when(k.lastUsedAt) ?? "never"}</td>
                <td className="py-2 pr-3" data-testid="key-state">{k.revokedAt ? `Revoked ${when(k.revokedAt)}` : "Active"}</td>
                <td className="py-2">
                  {k.canRevoke ? (
                    confirming === k.id ? (
                      <span className="flex gap-2">
                        <Button kind="danger" disabled={pending} onClick={() => revoke(k.id)}>
                          Revoke now
                        </Button>
                        <Button kind="secondary" disabled={pending} onClick={() => setConfirming(null)}>
                          Keep
                        </Button>
                      </span>
                    ) : (
                      <Button kind="secondary" onClick={() => setConfirming(k.id)} aria-label={`Revoke key ${k.name}`}>
                        Revoke
                      </Button>
                    )
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
