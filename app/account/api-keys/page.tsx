import type { Metadata } from "next";
import Link from "next/link";
import { KeyTable, NewKeyForm } from "@/components/api/api-keys-manager";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { keyHolderFor, listApiKeys } from "@/lib/api/keys";
import { flushUsage } from "@/lib/api/usage";
import { requirePageViewer } from "@/lib/auth/guard";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";

export const metadata: Metadata = { title: "API keys" };

export default async function ApiKeysPage() {
  const viewer = await requirePageViewer({ path: "/account/api-keys" });
  const holder = keyHolderFor(viewer);
  await flushUsage(); // so "last used" includes the latest requests
  const keys = await listApiKeys(viewer);
  const active = keys.filter((k) => !k.revokedAt && k.organizationId === (holder.kind === "organization" ? holder.organizationId : null)).length;
  const limits = PLAN_CATALOGUE[viewer.plan].limits;
  const target = holder.kind === "organization" ? holder.organizationName : "your account";
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="API keys"
        lead={
          <>
            Keys let your scripts and servers call the <Link href="/api" className="underline">Rainprint API</Link>. Send one as{" "}
            <code className="font-mono">Authorization: Bearer rp_live_…</code>. A key is shown once; Rainprint keeps only a hash of it.
          </>
        }
      />
      <section aria-labelledby="new-key-heading" className="flex flex-col gap-3">
        <h2 id="new-key-heading" className="text-lg font-semibold">
          Make a key
        </h2>
        {holder.maxKeys > 0 ? (
          <p className="text-sm text-ink-700" data-testid="key-allowance">
            {PLAN_CATALOGUE[viewer.plan].name} plan: up to {holder.maxKeys} active keys for {target} ({active} active now),{" "}
            {limits.apiRequestsPerDay.toLocaleString("en-GB")} requests a day{holder.kind === "organization" ? " shared by the organisation" : ""}.{" "}
            <Link href="/account/usage" className="underline">See usage</Link>.
          </p>
        ) : null}
        {holder.canCreate ? (
          <NewKeyForm target={target} />
        ) : (
          <Alert tone="info">
            {holder.reason}{" "}
            {holder.maxKeys === 0 ? (
              <Link href="/api#quotas" className="underline">
                What each plan includes
              </Link>
            ) : null}
          </Alert>
        )}
      </section>
      <section aria-labelledby="keys-heading" className="flex flex-col gap-3">
        <h2 id="keys-heading" className="text-lg font-semibold">
          Your keys
        </h2>
        <KeyTable keys={keys} />
        <p className="text-sm text-ink-600">Revoking a key takes effect on the next request made with it. Keys of an organisation stop working while its subscription is not active.</p>
      </section>
    </div>
  );
}
