import type { Metadata } from "next";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { NEUTRAL_MAIL_SENT } from "@/lib/auth/messages";

export const metadata: Metadata = { title: "Check your e-mail" };

export default function CheckEmailPage() {
  return (
    <div className="max-w-prose">
      <PageHeader title="Check your e-mail" />
      <Alert tone="success">{NEUTRAL_MAIL_SENT}</Alert>
    </div>
  );
}
