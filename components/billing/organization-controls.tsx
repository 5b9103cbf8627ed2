"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

/** The owner's invitation form; the server refuses it beyond the seat count and says why. */
export function InviteForm({ slug, refusal }: { slug: string; refusal: string | null }) {
  const f = useFormSend<{ message: string }>();
  const router = useRouter();
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-3"
      data-testid="invite-form"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = e.currentTarget;
        const d = new FormData(form);
        const ok = await f.send(`/api/organizations/${encodeURIComponent(slug)}/invitations`, { email: String(d.get("email") ?? "") });
        if (ok) {
          form.reset();
          router.refresh();
        }
      }}
    >
      {refusal && !f.message ? (
        <Alert tone="warn">
          <span data-testid="invite-refusal">{refusal}</span>
        </Alert>
      ) : null}
      {f.data ? <Alert tone="success">{f.data.message}</Alert> : null}
      {f.message ? (
        <Alert tone="error">
          <span data-testid="invite-error">{f.message}</span>
        </Alert>
      ) : null}
      <Field label="E-mail address of the person to invite" name="email" type="email" autoComplete="off" required errors={f.fieldErrors("email")} />
      <div>
        <Button type="submit" disabled={f.pending}>
          {f.pending ? "Sending…" : "Send invitation"}
        </Button>
      </div>
    </form>
  );
}

/** A button that sends DELETE to `url` after a confirmation step, then refreshes the page. */
export function ConfirmDelete({ url, label, confirmLabel, testId }: { url: string; label: string; confirmLabel: string; testId?: string }) {
  const router = useRouter();
  const [asking, setAsking] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (!asking)
    return (
      <Button type="button" kind="secondary" onClick={() => setAsking(true)} data-testid={testId}>
        {label}
      </Button>
    );
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <Button
        type="button"
        kind="danger"
        disabled={pending}
        data-testid={testId ? `${testId}-confirm` : undefined}
        onClick={async () => {
          setPending(true);
          const r = await sendJson(url, {}, "DELETE");
          setPending(false);
          if (!r.ok) return setError(problemMessage(r.problem));
          setAsking(false);
          router.refresh();
        }}
      >
        {confirmLabel}
      </Button>
      <Button type="button" kind="secondary" onClick={() => setAsking(false)}>
        Keep
      </Button>
      {error ? <span className="text-sm text-severity-fail">{error}</span> : null}
    </span>
  );
}

/** The accept button on an invitation page. */
export function AcceptInvitation({ token, organization }: { token: string; organization: string }) {
  const f = useFormSend<{ message: string; redirect: string }>();
  const router = useRouter();
  return (
    <div className="flex flex-col gap-3">
      {f.message ? (
        <Alert tone="error">
          <span data-testid="accept-error">{f.message}</span>
        </Alert>
      ) : null}
      <div>
        <Button
          type="button"
          disabled={f.pending}
          data-testid="accept-invitation"
          onClick={async () => {
            const ok = await f.send("/api/invitations/accept", { token });
            if (ok) router.push(ok.redirect);
          }}
        >
          {f.pending ? "Joining…" : `Join ${organization}`}
        </Button>
      </div>
    </div>
  );
}
