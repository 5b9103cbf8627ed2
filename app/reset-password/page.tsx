import type { Metadata } from "next";
import { EmailRequestForm } from "@/components/auth/email-request-form";
import { PageHeader } from "@/components/ui/page-header";

export const metadata: Metadata = { title: "Choose a new password" };

export default function ResetPasswordPage() {
  return (
    <div>
      <PageHeader title="Choose a new password" lead="Enter your e-mail address and we send you a one-time link to choose a new password." />
      <EmailRequestForm action="/api/account/password-reset" submitLabel="Send the link" />
    </div>
  );
}
