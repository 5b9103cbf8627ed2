import type { Metadata } from "next";
import Link from "next/link";
import { ResetConfirmForm } from "@/components/auth/reset-confirm-form";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password";
import { peekAuthToken } from "@/lib/auth/tokens";

export const metadata: Metadata = { title: "Choose a new password" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

const LINK_STATES = {
  used: { title: "This link has already been used", text: "Each link works once. Ask for a new one if you still need to change your password." },
  expired: { title: "This link has expired", text: "Links to choose a new password are valid for one hour. Ask for a new one." },
  invalid: { title: "This link is not valid", text: "Check that you opened the whole link from the e-mail, or ask for a new one." },
} as const;

export default async function NewPasswordPage({ searchParams }: Props) {
  const token = (await searchParams).token;
  const state = typeof token === "string" && token.length >= 16 && token.length <= 200 ? await peekAuthToken(token, "reset-password") : "invalid";
  return (
    <div>
      <PageHeader title="Choose a new password" />
      {state === "ok" ? (
        <ResetConfirmForm token={token as string} minLength={PASSWORD_MIN_LENGTH} />
      ) : (
        <Alert tone="error" title={LINK_STATES[state].title}>
          <p>{LINK_STATES[state].text}</p>
          <p className="mt-2">
            <Link href="/reset-password" className="underline">
              Ask for a new link
            </Link>
          </p>
        </Alert>
      )}
    </div>
  );
}
