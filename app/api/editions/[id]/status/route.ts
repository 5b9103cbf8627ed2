import { route } from "@/lib/http/route";
import { editionBuildStatus } from "@/lib/editions/lifecycle";

/** An edition's status and its build's progress and stage (moderators and admins; the builds page polls it). */
export const GET = route({ auth: { roles: ["moderator", "admin"] } }, async ({ params }) => Response.json(await editionBuildStatus(String(params.id))));
