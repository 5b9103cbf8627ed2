"use client";

import { useActionState, type ReactNode } from "react";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";

/** What a billing server action answers when it does not redirect. */
export type ActionState = { error: string | null; fields?: Record<string, string[]> };

/**
 * A form posting to a server action that redirects on success (to Checkout or
 * the billing portal) and answers a message otherwise. Works without
 * JavaScript too: the action runs as a normal form post.
 */
export function ActionForm({
  action,
  submitLabel,
  pendingLabel = "One moment…",
  kind = "primary",
  children,
  className,
  testId,
}: {
  action: (state: ActionState, form: FormData) => Promise<ActionState>;
  submitLabel: string;
  pendingLabel?: string;
  kind?: "primary" | "secondary";
  children?: ReactNode;
  className?: string;
  testId?: string;
}) {
  const [state, formAction, pending] = useActionState(action, { error: null });
  return (
    <form action={formAction} className={className ?? "flex flex-col gap-3"} data-testid={testId}>
      {state.error ? (
        <Alert tone="error">
          <span data-testid="action-error">{state.error}</span>
          {state.fields
            ? Object.entries(state.fields).map(([k, v]) => (
                <span key={k} className="block">
                  {v.join(" ")}
                </span>
              ))
            : null}
        </Alert>
      ) : null}
      {children}
      <div>
        <Button type="submit" kind={kind} disabled={pending}>
          {pending ? pendingLabel : submitLabel}
        </Button>
      </div>
    </form>
  );
}
