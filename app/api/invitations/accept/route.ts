import { acceptInvitation, acceptInvitationInput } from "@/lib/organizations";
import { route } from "@/lib/http/route";

/** Accept an invitation as the signed-in person (whose address must be the invited one). */
export const POST = route({ auth: {}, body: acceptInvitationInput }, async ({ viewer, body }) => {
  const org = await acceptInvitation(viewer, body.token);
  return Response.json(
    { organization: org, message: `You joined ${org.name}.`, redirect: `/organizations/${org.slug}` },
    { headers: { "Cache-Control": "no-store" } },
  );
});
