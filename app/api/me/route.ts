import { route } from "@/lib/http/route";

/** Who is asking: the signed-in viewer as the guard sees it (role and plan from the database). */
export const GET = route({ auth: {} }, async ({ viewer }) => Response.json(viewer, { headers: { "Cache-Control": "no-store" } }));
