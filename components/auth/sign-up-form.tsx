"use client";

import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

export function SignUpForm({ minLength }: { minLength: number }) {
  const f = useFormSend<{ message: string }>();
  if (f.data)
    return (
      <div data-testid="sign-up-done">
        <Alert tone="success" title="Check your e-mail">
          {f.data.message}
        </Alert>
      </div>
    );
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        const d = new FormData(e.currentTarget);
        void f.send("/api/account/sign-up", {
          name: String(d.get("name") ?? ""),
          email: String(d.get("email") ?? ""),
          password: String(d.get("password") ?? ""),
          affiliation: String(d.get("affiliation") ?? ""),
        });
      }}
    >
      {f.message ? (
        <Alert tone="error">
          <span data-testid="form-error">{f.message}</span>
        </Alert>
      ) : null}
      <Field label="Your name" name="name" autoComplete="name" required errors={f.fieldErrors("name")} />
      <Field label="E-mail address" name="email" type="email" autoComplete="email" required errors={f.fieldErrors("email")} />
      <Field
        label="Password"
        name="password"
        type="password"
        autoComplete="new-password"
        required
        hint={`At least ${minLength} characters. Long phrases are good; common passwords are refused.`}
        errors={f.fieldErrors("password")}
      />
      <Field label="Affiliation (optional)" name="affiliation" autoComplete="organization" errors={f.fieldErrors("affiliation")} />
      <div>
        <Button type="submit" disabled={f.pending}>
          {f.pending ? "Creating…" : "Create account"}
        </Button>
      </div>
    </form>
  );
}
