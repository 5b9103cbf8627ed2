"use client";

import Link from "next/link";
import { signIn } from "next-auth/react";
import { useState } from "react";
import { NEUTRAL_MAIL_SENT, signInErrorMessage } from "@/lib/auth/messages";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";

function safeCallback(url: string | undefined): string {
  return url && url.startsWith("/") && !url.startsWith("//") ? url : "/account";
}

export function SignInForms({ callbackUrl, initialError }: { callbackUrl?: string; initialError?: string }) {
  const target = safeCallback(callbackUrl);
  const [error, setError] = useState<string | null>(initialError ?? null);
  const [pending, setPending] = useState(false);
  const [linkSent, setLinkSent] = useState(false);
  const [linkPending, setLinkPending] = useState(false);

  async function onPassword(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setError(null);
    const res = await signIn("credentials", {
      email: String(form.get("email") ?? ""),
      password: String(form.get("password") ?? ""),
      redirect: false,
      callbackUrl: target,
    });
    setPending(false);
    if (res?.ok && !res.error) {
      // A full navigation so every server component sees the new session.
      window.location.assign(target);
      return;
    }
    setError(res?.error ?? "default");
  }

  async function onLink(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setLinkPending(true);
    await signIn("email", { email: String(form.get("email") ?? ""), redirect: false, callbackUrl: target });
    setLinkPending(false);
    setLinkSent(true);
  }

  const message = signInErrorMessage(error);
  return (
    <div className="grid gap-10 md:grid-cols-2">
      <section aria-labelledby="pw-heading">
        <h2 id="pw-heading" className="text-lg font-semibold">
          With your password
        </h2>
        <form onSubmit={onPassword} className="mt-4 flex flex-col gap-4" noValidate>
          {message ? (
            <Alert tone="error">
              <p data-testid="sign-in-error">{message}</p>
              {error === "invalid" || error === "CredentialsSignin" ? (
                <p className="mt-2">
                  <Link href="/verify/resend" className="underline">
                    Send the confirmation link again
                  </Link>{" "}
                  ·{" "}
                  <Link href="/reset-password" className="underline">
                    Choose a new password
                  </Link>
                </p>
              ) : null}
              {error === "throttled" ? (
                <p className="mt-2">
                  <Link href="/reset-password" className="underline">
                    Choose a new password
                  </Link>
                </p>
              ) : null}
            </Alert>
          ) : null}
          <Field label="E-mail address" name="email" type="email" autoComplete="email" required />
          <Field label="Password" name="password" type="password" autoComplete="current-password" required />
          <div className="flex flex-wrap items-center gap-4">
            <Button type="submit" disabled={pending}>
              {pending ? "Signing in…" : "Sign in"}
            </Button>
            <Link href="/reset-password" className="text-sm underline">
              Forgot your password?
            </Link>
          </div>
        </form>
      </section>
      <section aria-labelledby="link-heading">
        <h2 id="link-heading" className="text-lg font-semibold">
          With a link by e-mail
        </h2>
        <p className="mt-1 text-sm text-ink-700">We send a one-time link that signs you in without a password.</p>
        {linkSent ? (
          <div className="mt-4">
            <Alert tone="success" title="Check your e-mail">
              {NEUTRAL_MAIL_SENT}
            </Alert>
          </div>
        ) : (
          <form onSubmit={onLink} className="mt-4 flex flex-col gap-4">
            <Field label="E-mail address" name="email" id="link-email" type="email" autoComplete="email" required />
            <div>
              <Button type="submit" kind="secondary" disabled={linkPending}>
                {linkPending ? "Sending…" : "Send me a sign-in link"}
              </Button>
            </div>
          </form>
        )}
      </section>
    </div>
  );
}
