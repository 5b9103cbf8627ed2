import { route } from "@/lib/http/route";
import { retryEditionBuild } from "@/lib/editions/lifecycle";

/** Resume a failed or cancelled build from what it had finished (moderators and admins). */
export const POST = route({ auth: { roles: ["moderator", "admin"] } }, async ({ viewer, params }) =>
  Response.json(await retryEditionBuild(String(params.id), viewer.id), { status: 202 }),
);
