import type { Metadata } from "next";
import Link from "next/link";
import { VerifyForm } from "@/components/auth/verify-form";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";

export const metadata: Metadata = { title: "Confirm your e-mail address" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function VerifyPage({ searchParams }: Props) {
  const token = (await searchParams).token;
  return (
    <div className="max-w-prose">
      <PageHeader title="Confirm your e-mail address" />
      {typeof token === "string" && token ? (
        <VerifyForm token={token} />
      ) : (
        <Alert tone="error" title="This link is not complete">
          <p>Open the whole link from the confirmation e-mail, or ask for a new one.</p>
          <p className="mt-2">
            <Link href="/verify/resend" className="underline">
              Send a new confirmation link
            </Link>
          </p>
        </Alert>
      )}
    </div>
  );
}
