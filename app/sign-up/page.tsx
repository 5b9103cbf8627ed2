import type { Metadata } from "next";
import Link from "next/link";
import { SignUpForm } from "@/components/auth/sign-up-form";
import { PageHeader } from "@/components/ui/page-header";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <div>
      <PageHeader
        title="Create an account"
        lead="A free account lets you register collection stations, submit samples and follow how your data is used. We send a link to confirm your e-mail address."
      />
      <SignUpForm minLength={PASSWORD_MIN_LENGTH} />
      <p className="mt-8 text-sm text-ink-700">
        Already have an account?{" "}
        <Link href="/sign-in" className="underline">
          Sign in
        </Link>
      </p>
    </div>
  );
}
