import { errors } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { cancelJob } from "@/lib/jobs";

/** Cancel a queued or running job (moderators and admins). */
export const POST = route({ auth: { roles: ["moderator", "admin"] } }, async ({ params }) => {
  const outcome = await cancelJob(String(params.id));
  if (!outcome) throw errors.notFound("There is no job with this id.");
  return Response.json({ outcome });
});
