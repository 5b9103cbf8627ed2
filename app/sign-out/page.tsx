import type { Metadata } from "next";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { PageHeader } from "@/components/ui/page-header";

export const metadata: Metadata = { title: "Sign out" };

export default function SignOutPage() {
  return (
    <div>
      <PageHeader title="Sign out" lead="Sign out of Rainprint on this device." />
      <SignOutButton className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800" />
    </div>
  );
}
