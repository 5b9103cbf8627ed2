"use client";

import Link from "next/link";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

export function ResetConfirmForm({ token, minLength }: { token: string; minLength: number }) {
  const f = useFormSend<{ message: string }>();
  if (f.data)
    return (
      <Alert tone="success" title="Password changed">
        <p>{f.data.message}</p>
        <p className="mt-2">
          <Link href="/sign-in" className="font-medium underline">
            Sign in
          </Link>
        </p>
      </Alert>
    );
  const linkProblem = f.problem && f.problem.code.startsWith("link-");
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        void f.send("/api/account/password-reset/confirm", { token, password: String(new FormData(e.currentTarget).get("password") ?? "") });
      }}
    >
      {f.message ? (
        <Alert tone="error" title={linkProblem ? f.problem?.title : undefined}>
          <p>{f.message}</p>
          {linkProblem ? (
            <p className="mt-2">
              <Link href="/reset-password" className="underline">
                Ask for a new link
              </Link>
            </p>
          ) : null}
        </Alert>
      ) : null}
      <Field
        label="New password"
        name="password"
        type="password"
        autoComplete="new-password"
        required
        hint={`At least ${minLength} characters; common passwords are refused.`}
        errors={f.fieldErrors("password")}
      />
      <div>
        <Button type="submit" disabled={f.pending}>
          {f.pending ? "Saving…" : "Save new password"}
        </Button>
      </div>
    </form>
  );
}
