// Billing's own errors: each knows its HTTP status and whether its message may
// be shown to the person who caused it.

export type BillingErrorCode =
  | "wrong-holder"
  | "invalid-seats"
  | "already-subscribed"
  | "no-billing-account"
  | "price-missing"
  | "price-mismatch"
  | "payments-unavailable";

export class BillingError extends Error {
  constructor(
    readonly code: BillingErrorCode,
    message: string,
    readonly status: number,
    /** True when `message` is written for the user; otherwise show a generic message and log this one. */
    readonly showable: boolean,
  ) {
    super(message);
    this.name = "BillingError";
  }
}
