import type { Metadata } from "next";
import { EmailRequestForm } from "@/components/auth/email-request-form";
import { PageHeader } from "@/components/ui/page-header";

export const metadata: Metadata = { title: "Send the confirmation link again" };

export default function ResendVerificationPage() {
  return (
    <div>
      <PageHeader
        title="Send the confirmation link again"
        lead="Enter the address you signed up with. If it belongs to an account that still needs confirming, we send a new link."
      />
      <EmailRequestForm action="/api/account/resend-verification" submitLabel="Send the link" />
    </div>
  );
}
