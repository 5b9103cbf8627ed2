import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { SignInForms } from "@/components/auth/sign-in-forms";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Sign in" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function SignInPage({ searchParams }: Props) {
  const sp = await searchParams;
  const callbackUrl = typeof sp.callbackUrl === "string" ? sp.callbackUrl : undefined;
  const error = typeof sp.error === "string" ? sp.error : undefined;
  const viewer = await getViewer();
  if (viewer && !error) redirect(callbackUrl && callbackUrl.startsWith("/") && !callbackUrl.startsWith("//") ? callbackUrl : "/account");
  return (
    <div>
      <PageHeader title="Sign in" lead="Sign in with your password, or ask for a one-time link by e-mail." />
      <SignInForms callbackUrl={callbackUrl} initialError={error} />
      <p className="mt-10 text-sm text-ink-700">
        No account yet?{" "}
        <Link href="/sign-up" className="underline">
          Create one
        </Link>{" "}
        — it is free, and every new account can contribute data.
      </p>
    </div>
  );
}
