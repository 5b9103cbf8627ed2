import { route } from "@/lib/http/route";
import { startBuildInput, startEditionBuild } from "@/lib/editions/lifecycle";

/** Start an edition build from the accepted samples (moderators and admins); answers 202 with the edition and job ids. */
export const POST = route({ auth: { roles: ["moderator", "admin"] }, body: startBuildInput }, async ({ viewer, body }) =>
  Response.json(await startEditionBuild(body, viewer.id), { status: 202 }),
);
