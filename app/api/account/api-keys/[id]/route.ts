import { revokeApiKey } from "@/lib/api/keys";
import { route } from "@/lib/http/route";

/** Revoke a key (effective for the next request). Allowed on any plan, so a lapsed account can still retire its keys. */
export const DELETE = route({ auth: {} }, async ({ viewer, params }) => {
  const key = await revokeApiKey(viewer, String(params.id));
  return Response.json({ key, message: `Key “${key.name}” is revoked; requests with it are refused from now on.` }, { headers: { "Cache-Control": "no-store" } });
});
