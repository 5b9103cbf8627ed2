import { installBillingMail } from "@/lib/billing/mail";
import { handleStripeWebhook, WebhookSignatureError } from "@/lib/billing/webhook";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

// Billing notices (receipts, plan changes, failed payments, …) go out by e-mail,
// queued inside the transaction that records each event.
installBillingMail();

const problem = (status: number, type: string, title: string, detail: string) =>
  new Response(JSON.stringify({ type, title, status, detail }), {
    status,
    headers: { "Content-Type": "application/problem+json", "Cache-Control": "no-store" },
  });

/**
 * Stripe webhook endpoint. The signature is checked on the raw body, so the
 * body is read as text and never parsed before verification. Who is asking is
 * proven by the signature alone (no session).
 */
export async function POST(req: Request): Promise<Response> {
  const raw = await req.text();
  try {
    const outcome = await handleStripeWebhook(raw, req.headers.get("stripe-signature"));
    return Response.json({ received: true, ...outcome }, { headers: { "Cache-Control": "no-store" } });
  } catch (e) {
    if (e instanceof WebhookSignatureError)
      return problem(400, "/problems/stripe-signature", "The webhook signature did not verify", e.message);
    console.error("stripe webhook failed", e);
    // A 5xx makes Stripe deliver the event again later.
    return problem(500, "/problems/webhook-failed", "The webhook could not be processed", "It will be retried.");
  }
}
