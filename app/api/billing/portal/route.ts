import { beginPortal, portalInput } from "@/lib/billing/overview";
import { route } from "@/lib/http/route";

/** Open the Stripe billing portal for the viewer's own subscription, or for an organisation they own. Answers its URL. */
export const POST = route({ auth: {}, body: portalInput }, async ({ viewer, body }) =>
  Response.json(await beginPortal(viewer, body), { headers: { "Cache-Control": "no-store" } }),
);
