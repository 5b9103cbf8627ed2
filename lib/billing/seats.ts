// Institution seats: who in an organisation holds one of the seats its
// subscription pays for. Pure (no database, no clock): lib/billing/account.ts
// applies it on every request through the guard, and the organisation page
// shows the same result.
//
// The rule (DEVELOPERS.md, "Institution seats"):
//   - every member occupies a seat, owners included;
//   - seats go to owners first, then to members in the order they joined
//     (ties broken by user id, so the answer never depends on row order);
//   - when the seat count drops below the number of members (fewer seats
//     bought in the billing portal), the members who joined last keep their
//     membership but lose the Institution plan until seats are added or other
//     members are removed; the organisation is "over its seats" and refuses
//     new invitations meanwhile;
//   - an invitation reserves a seat while it is pending, so accepting one can
//     never push the organisation over its seats; an invitation is refused when
//     members + pending invitations already fill every seat.

export interface SeatMember {
  userId: string;
  role: "owner" | "member";
  /** When the person joined the organisation. */
  joinedAt: Date;
}

export interface SeatAssignment {
  /** Seats the subscription pays for. */
  seats: number;
  /** Members holding a seat, in seat order. */
  holders: string[];
  /** Members without a seat (joined last), in joining order. */
  without: string[];
  /** Members beyond the seat count (without.length). */
  over: number;
}

function seatOrder(a: SeatMember, b: SeatMember): number {
  if (a.role !== b.role) return a.role === "owner" ? -1 : 1;
  return a.joinedAt.getTime() - b.joinedAt.getTime() || (a.userId < b.userId ? -1 : a.userId > b.userId ? 1 : 0);
}

/** Which members hold the `seats` seats. */
export function assignSeats(members: readonly SeatMember[], seats: number): SeatAssignment {
  const n = Math.max(0, Math.floor(seats));
  const ordered = [...members].sort(seatOrder);
  const holders = ordered.slice(0, n).map((m) => m.userId);
  const without = ordered.slice(n).map((m) => m.userId);
  return { seats: n, holders, without, over: without.length };
}

export interface SeatUse {
  seats: number;
  members: number;
  pendingInvitations: number;
  /** Seats neither taken by a member nor reserved by a pending invitation (never negative). */
  free: number;
  /** Members beyond the seat count. */
  over: number;
}

export function seatUse(seats: number, members: number, pendingInvitations: number): SeatUse {
  return {
    seats,
    members,
    pendingInvitations,
    free: Math.max(0, seats - members - pendingInvitations),
    over: Math.max(0, members - seats),
  };
}

/** Why a new invitation cannot be sent (null when it can), in words for the owner. */
export function invitationRefusal(use: SeatUse): string | null {
  if (use.over > 0)
    return `The organisation has ${use.members} members but pays for ${use.seats} seats. Remove ${use.over} member${
      use.over === 1 ? "" : "s"
    } or add seats under Manage billing before inviting anyone.`;
  if (use.free <= 0)
    return `All ${use.seats} seats are taken (${use.members} member${use.members === 1 ? "" : "s"}${
      use.pendingInvitations ? `, ${use.pendingInvitations} pending invitation${use.pendingInvitations === 1 ? "" : "s"}` : ""
    }). Add seats under Manage billing, withdraw a pending invitation or remove a member first.`;
  return null;
}
