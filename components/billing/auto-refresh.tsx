"use client";

import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";

/**
 * Re-render the page from the server every `intervalMs` until it stops
 * rendering this component (the awaited state arrived) or `maxSeconds` pass.
 * For the Checkout return page: Stripe's webhook may land a moment after the
 * browser comes back.
 */
export function AutoRefresh({ intervalMs = 1500, maxSeconds = 120 }: { intervalMs?: number; maxSeconds?: number }) {
  const router = useRouter();
  const [gaveUp, setGaveUp] = useState(false);
  useEffect(() => {
    const started = Date.now();
    const t = setInterval(() => {
      if (Date.now() - started > maxSeconds * 1000) {
        clearInterval(t);
        setGaveUp(true);
        return;
      }
      router.refresh();
    }, intervalMs);
    return () => clearInterval(t);
  }, [router, intervalMs, maxSeconds]);
  return gaveUp ? (
    <p className="text-sm text-ink-700" role="status">
      This is taking longer than usual. The payment itself is safe; your plan appears as soon as our payment provider confirms it. Reload
      this page in a few minutes, or check Billing.
    </p>
  ) : (
    <noscript>
      <p className="text-sm text-ink-700">Reload this page in a few seconds to see whether the plan is active.</p>
    </noscript>
  );
}
