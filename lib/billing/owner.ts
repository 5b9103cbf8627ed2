// Who a Stripe customer or subscription belongs to in Rainprint: a person
// (Researcher) or an organisation (Institution). Written into Stripe metadata
// and the Checkout client_reference_id, read back by the webhook handler.

export type BillingOwner = { kind: "user"; userId: string } | { kind: "organization"; organizationId: string };

export const OWNER_METADATA = { user: "rainprint_user_id", organization: "rainprint_organization_id" } as const;

export function ownerMetadata(owner: BillingOwner): Record<string, string> {
  return owner.kind === "user"
    ? { [OWNER_METADATA.user]: owner.userId }
    : { [OWNER_METADATA.organization]: owner.organizationId };
}

export function ownerFromMetadata(metadata: Record<string, string> | null | undefined): BillingOwner | null {
  if (!metadata) return null;
  const userId = metadata[OWNER_METADATA.user];
  const organizationId = metadata[OWNER_METADATA.organization];
  if (userId && !organizationId) return { kind: "user", userId };
  if (organizationId && !userId) return { kind: "organization", organizationId };
  return null;
}

/** `user:<id>` or `org:<id>`, as sent in Checkout's client_reference_id. */
export function ownerReference(owner: BillingOwner): string {
  return owner.kind === "user" ? `user:${owner.userId}` : `org:${owner.organizationId}`;
}

export function ownerFromReference(ref: string | null | undefined): BillingOwner | null {
  const m = /^(user|org):([A-Za-z0-9_-]{1,200})$/.exec(ref ?? "");
  if (!m) return null;
  return m[1] === "user" ? { kind: "user", userId: m[2] } : { kind: "organization", organizationId: m[2] };
}

export function sameOwner(a: BillingOwner, b: BillingOwner): boolean {
  return a.kind === "user" && b.kind === "user"
    ? a.userId === b.userId
    : a.kind === "organization" && b.kind === "organization" && a.organizationId === b.organizationId;
}

/** Column values for the subscriptions and billing_customers tables. */
export function ownerColumns(owner: BillingOwner): { userId: string | null; organizationId: string | null } {
  return owner.kind === "user"
    ? { userId: owner.userId, organizationId: null }
    : { userId: null, organizationId: owner.organizationId };
}

export function ownerFromColumns(row: { userId: string | null; organizationId: string | null }): BillingOwner | null {
  if (row.userId && !row.organizationId) return { kind: "user", userId: row.userId };
  if (row.organizationId && !row.userId) return { kind: "organization", organizationId: row.organizationId };
  return null;
}
