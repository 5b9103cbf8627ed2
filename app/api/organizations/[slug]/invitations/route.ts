import { inviteInput, inviteMember } from "@/lib/organizations";
import { route } from "@/lib/http/route";

/** Invite someone by e-mail to take one of the organisation's seats (owners only; refused beyond the seat count). */
export const POST = route({ auth: {}, body: inviteInput }, async ({ viewer, body, params }) => {
  const inv = await inviteMember(viewer, String(params.slug), body.email);
  return Response.json(
    { id: inv.id, email: inv.email, expiresAt: inv.expiresAt.toISOString(), seats: inv.seats, message: `Invitation sent to ${inv.email}.` },
    { status: 201, headers: { "Cache-Control": "no-store" } },
  );
});
