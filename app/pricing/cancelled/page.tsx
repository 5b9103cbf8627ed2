import type { Metadata } from "next";
import Link from "next/link";
import { PageHeader } from "@/components/ui/page-header";

export const metadata: Metadata = { title: "Checkout cancelled" };

export default function CheckoutCancelledPage() {
  return (
    <div className="max-w-prose">
      <PageHeader title="Checkout cancelled" lead="Nothing was charged and your plan is unchanged." />
      <p className="text-ink-700">
        You can come back to the plans at any time. If something on the payment page did not work, tell us; nothing you entered there was
        stored by Rainprint.
      </p>
      <p className="mt-4">
        <Link href="/pricing" className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800">
          Back to plans and prices
        </Link>
      </p>
    </div>
  );
}
