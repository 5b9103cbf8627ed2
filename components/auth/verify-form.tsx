"use client";

import Link from "next/link";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { useFormSend } from "../ui/use-form-send";

/** A button that confirms the address (a POST, so link scanners that only fetch pages do not use up the link). */
export function VerifyForm({ token }: { token: string }) {
  const f = useFormSend<{ message: string }>();
  if (f.data)
    return (
      <Alert tone="success" title="E-mail address confirmed">
        <p>{f.data.message}</p>
        <p className="mt-2">
          <Link href="/sign-in" className="font-medium underline">
            Sign in
          </Link>
        </p>
      </Alert>
    );
  return (
    <div className="flex flex-col gap-4">
      {f.message ? (
        <Alert tone="error" title={f.problem?.title}>
          <p>{f.problem?.detail}</p>
          <p className="mt-2">
            <Link href="/verify/resend" className="underline">
              Send a new confirmation link
            </Link>
          </p>
        </Alert>
      ) : null}
      <div>
        <Button type="button" disabled={f.pending} onClick={() => void f.send("/api/account/verify", { token })}>
          {f.pending ? "Confirming…" : "Confirm my e-mail address"}
        </Button>
      </div>
    </div>
  );
}
