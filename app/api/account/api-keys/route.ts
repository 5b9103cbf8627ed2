import { createApiKey, apiKeyNameInput, keyHolderFor, listApiKeys } from "@/lib/api/keys";
import { route } from "@/lib/http/route";

// The account's API keys (the keys page calls these). Personal keys for
// Researcher accounts; the organisation's keys for Institution members (the
// owner makes and revokes them).

/** The keys the viewer can see, and where a new key would go. */
export const GET = route({ auth: {} }, async ({ viewer }) =>
  Response.json({ holder: keyHolderFor(viewer), keys: await listApiKeys(viewer) }, { headers: { "Cache-Control": "no-store" } }),
);

/** Make a key. The answer holds the secret; it is never shown again. */
export const POST = route({ auth: { plans: ["researcher", "institution"] }, body: apiKeyNameInput }, async ({ viewer, body }) => {
  const made = await createApiKey(viewer, body);
  return Response.json(
    { ...made, message: "Copy the key now: Rainprint keeps only its hash and cannot show it again." },
    { status: 201, headers: { "Cache-Control": "no-store" } },
  );
});
