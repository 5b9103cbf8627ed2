// The seat rule (lib/billing/seats.ts): who holds the seats an Institution
// subscription pays for, and when an invitation is refused. Pure; expected
// values follow from the rule as written in DEVELOPERS.md ("Institution seats").
import { describe, expect, it } from "vitest";
import { assignSeats, invitationRefusal, seatUse, type SeatMember } from "@/lib/billing/seats";

const t = (day: number) => new Date(Date.UTC(2026, 0, day));
const members: SeatMember[] = [
  { userId: "m-late", role: "member", joinedAt: t(20) },
  { userId: "owner-2", role: "owner", joinedAt: t(15) },
  { userId: "m-early", role: "member", joinedAt: t(2) },
  { userId: "owner-1", role: "owner", joinedAt: t(1) },
  { userId: "m-mid", role: "member", joinedAt: t(10) },
];

describe("assignSeats", () => {
  it("gives seats to owners first, then to members in the order they joined", () => {
    expect(assignSeats(members, 10).holders).toEqual(["owner-1", "owner-2", "m-early", "m-mid", "m-late"]);
    expect(assignSeats(members, 10).over).toBe(0);
  });

  it("with fewer seats than members, the members who joined last go without", () => {
    const a = assignSeats(members, 3);
    expect(a.holders).toEqual(["owner-1", "owner-2", "m-early"]);
    expect(a.without).toEqual(["m-mid", "m-late"]);
    expect(a.over).toBe(2);
  });

  it("an owner who joined after every member still holds a seat before them", () => {
    const late: SeatMember[] = [
      { userId: "m1", role: "member", joinedAt: t(1) },
      { userId: "boss", role: "owner", joinedAt: t(30) },
    ];
    expect(assignSeats(late, 1).holders).toEqual(["boss"]);
  });

  it("does not depend on row order, and breaks same-instant ties by user id", () => {
    const same: SeatMember[] = [
      { userId: "b", role: "member", joinedAt: t(5) },
      { userId: "a", role: "member", joinedAt: t(5) },
    ];
    expect(assignSeats(same, 1).holders).toEqual(["a"]);
    expect(assignSeats([...same].reverse(), 1).holders).toEqual(["a"]);
    expect(assignSeats([...members].reverse(), 4)).toEqual(assignSeats(members, 4));
  });

  it("treats zero or fractional seat counts safely", () => {
    expect(assignSeats(members, 0).holders).toEqual([]);
    expect(assignSeats(members, 2.9).holders).toHaveLength(2);
  });
});

describe("seatUse and invitationRefusal", () => {
  it("counts pending invitations as reserved seats", () => {
    expect(seatUse(5, 2, 1)).toEqual({ seats: 5, members: 2, pendingInvitations: 1, free: 2, over: 0 });
    expect(invitationRefusal(seatUse(5, 2, 1))).toBeNull();
  });

  it("refuses an invitation when members and pending invitations fill every seat, saying what to do", () => {
    const msg = invitationRefusal(seatUse(3, 2, 1));
    expect(msg).toMatch(/All 3 seats are taken \(2 members, 1 pending invitation\)/);
    expect(msg).toMatch(/Add seats/);
  });

  it("refuses invitations while the organisation has more members than seats", () => {
    const use = seatUse(3, 5, 0);
    expect(use.over).toBe(2);
    expect(use.free).toBe(0);
    expect(invitationRefusal(use)).toMatch(/5 members but pays for 3 seats\. Remove 2 members/);
  });
});
