"use client";

import { NEUTRAL_MAIL_SENT } from "@/lib/auth/messages";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

/** One e-mail field posted to `action`; always answers with the neutral message on success. */
export function EmailRequestForm({ action, submitLabel }: { action: string; submitLabel: string }) {
  const f = useFormSend<{ message: string }>();
  if (f.data)
    return (
      <Alert tone="success" title="Check your e-mail">
        {f.data.message ?? NEUTRAL_MAIL_SENT}
      </Alert>
    );
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        void f.send(action, { email: String(new FormData(e.currentTarget).get("email") ?? "") });
      }}
    >
      {f.message && !f.fieldErrors("email") ? <Alert tone="error">{f.message}</Alert> : null}
      <Field label="E-mail address" name="email" type="email" autoComplete="email" required errors={f.fieldErrors("email")} />
      <div>
        <Button type="submit" disabled={f.pending}>
          {f.pending ? "Sending…" : submitLabel}
        </Button>
      </div>
    </form>
  );
}
