import { beginCheckout, checkoutInput } from "@/lib/billing/overview";
import { route } from "@/lib/http/route";

/**
 * Start Stripe Checkout for the signed-in person (Researcher) or an
 * organisation they own or create now (Institution). Answers the Checkout URL
 * to send the browser to. The pricing page's buttons use the same function
 * through a server action.
 */
export const POST = route({ auth: {}, body: checkoutInput }, async ({ viewer, body }) => {
  const { url, sessionId, organizationSlug } = await beginCheckout(viewer, body);
  return Response.json({ url, sessionId, organizationSlug: organizationSlug ?? null }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
