import type { Plan } from "@/db/schema";

// The plan catalogue: the one source of truth for what each plan unlocks and
// what it costs. The pricing page, the guard in lib/auth, the API quotas, the
// checkout helper and the local payments stand-in (which seeds its prices from
// here) all read this module. Pure data and functions: safe in client code.
//
// Money is in minor units (cents) of CATALOGUE_CURRENCY. Stripe prices are
// found by their lookup keys; with real Stripe, create one recurring price per
// lookup key below with exactly these amounts (DEVELOPERS.md).

export type { Plan };
export type BillingInterval = "month" | "year";
export const BILLING_INTERVALS: readonly BillingInterval[] = ["month", "year"];

/** The currency of every catalogue price (ISO 4217, lower case as Stripe writes it). */
export const CATALOGUE_CURRENCY = "eur";

/** Days a paid plan keeps working after a failed payment, before it drops to Open. */
export const PAYMENT_GRACE_DAYS = 7;

export interface PlanLimits {
  /** Single-site lookups in the browser per day; null = no daily cap. */
  siteLookupsPerDay: number | null;
  /** Most sites in one batch lookup (file upload or API call); 0 = batch lookup not included. */
  batchLookupMaxSites: number;
  /** Edition surfaces as GeoTIFF and CSV. */
  surfaceDownloads: boolean;
  /** Accepted station data (monthly samples, station means) as CSV and GeoJSON. */
  stationDataDownloads: boolean;
  /** API keys the account (or organisation) may hold at once; 0 = no keys. */
  apiKeys: number;
  /**
   * API requests per UTC day. With keys: per account (Researcher) or shared by the whole
   * organisation (Institution). On Open: keyless requests per client address.
   */
  apiRequestsPerDay: number;
}

export interface SeatRule {
  /** Seats are bought per seat: the price is per seat per interval. */
  minSeats: number;
  maxSeats: number;
}

export interface CataloguePrice {
  plan: Exclude<Plan, "open">;
  interval: BillingInterval;
  /** The Stripe price lookup key. */
  lookupKey: string;
  /** Amount per interval (per seat when the plan has seats), in cents. */
  unitAmountCents: number;
  currency: string;
}

export interface PlanSpec {
  id: Plan;
  name: string;
  /** One line under the plan name. */
  tagline: string;
  /** Who holds the plan: nobody (free), one person, or an organisation with seats. */
  holder: "anyone" | "person" | "organization";
  limits: PlanLimits;
  seats: SeatRule | null;
  prices: Record<BillingInterval, CataloguePrice> | null;
}

const price = (plan: Exclude<Plan, "open">, interval: BillingInterval, unitAmountCents: number): CataloguePrice => ({
  plan,
  interval,
  lookupKey: `rainprint_${plan}_${interval}`,
  unitAmountCents,
  currency: CATALOGUE_CURRENCY,
});

export const PLAN_CATALOGUE: Readonly<Record<Plan, PlanSpec>> = {
  open: {
    id: "open",
    name: "Open",
    tagline: "Browse the map, read station pages and look up a few sites a day.",
    holder: "anyone",
    limits: {
      siteLookupsPerDay: 20,
      batchLookupMaxSites: 0,
      surfaceDownloads: false,
      stationDataDownloads: false,
      apiKeys: 0,
      apiRequestsPerDay: 50,
    },
    seats: null,
    prices: null,
  },
  researcher: {
    id: "researcher",
    name: "Researcher",
    tagline: "For one person: downloads, batch lookups and an API key for your own scripts.",
    holder: "person",
    limits: {
      siteLookupsPerDay: null,
      batchLookupMaxSites: 2_000,
      surfaceDownloads: true,
      stationDataDownloads: true,
      apiKeys: 3,
      apiRequestsPerDay: 2_000,
    },
    seats: null,
    // Yearly = ten months' price.
    prices: { month: price("researcher", "month", 1_900), year: price("researcher", "year", 19_000) },
  },
  institution: {
    id: "institution",
    name: "Institution",
    tagline: "For a team or organisation: seats for its members and API access for its pipelines.",
    holder: "organization",
    limits: {
      siteLookupsPerDay: null,
      batchLookupMaxSites: 10_000,
      surfaceDownloads: true,
      stationDataDownloads: true,
      apiKeys: 20,
      apiRequestsPerDay: 50_000,
    },
    seats: { minSeats: 3, maxSeats: 250 },
    prices: { month: price("institution", "month", 4_900), year: price("institution", "year", 49_000) },
  },
};

/** Plans from least to most: the order the guard uses to compare them. */
export const PLAN_ORDER: readonly Plan[] = ["open", "researcher", "institution"];

export function planRank(plan: Plan): number {
  return PLAN_ORDER.indexOf(plan);
}

/** The better of two plans. */
export function higherPlan(a: Plan, b: Plan): Plan {
  return planRank(a) >= planRank(b) ? a : b;
}

export function planSpec(plan: Plan): PlanSpec {
  return PLAN_CATALOGUE[plan];
}

export function planLimits(plan: Plan): PlanLimits {
  return PLAN_CATALOGUE[plan].limits;
}

/** Every catalogue price (the stand-in seeds these; checkout looks them up by key). */
export function cataloguePrices(): CataloguePrice[] {
  return PLAN_ORDER.flatMap((p) => {
    const prices = PLAN_CATALOGUE[p].prices;
    return prices ? BILLING_INTERVALS.map((i) => prices[i]) : [];
  });
}

export function cataloguePrice(plan: Exclude<Plan, "open">, interval: BillingInterval): CataloguePrice {
  const prices = PLAN_CATALOGUE[plan].prices;
  if (!prices) throw new Error(`plan ${plan} has no prices`);
  return prices[interval];
}

/** The catalogue entry for a Stripe price lookup key, or null for a key we do not sell. */
export function priceForLookupKey(lookupKey: string | null | undefined): CataloguePrice | null {
  if (!lookupKey) return null;
  return cataloguePrices().find((p) => p.lookupKey === lookupKey) ?? null;
}

/**
 * The cheapest plan whose limits pass `allows`, e.g. for "this download needs Researcher".
 * Null when no plan allows it.
 */
export function lowestPlanAllowing(allows: (limits: PlanLimits) => boolean): Plan | null {
  return PLAN_ORDER.find((p) => allows(PLAN_CATALOGUE[p].limits)) ?? null;
}

/** Seats clamped to the plan's rule (1 for plans without seats). */
export function clampSeats(plan: Plan, seats: number): number {
  const rule = PLAN_CATALOGUE[plan].seats;
  if (!rule) return 1;
  return Math.min(rule.maxSeats, Math.max(rule.minSeats, Math.floor(seats)));
}

/** Total per interval in cents for a plan, interval and seat count. */
export function totalCents(plan: Exclude<Plan, "open">, interval: BillingInterval, seats = 1): number {
  const unit = cataloguePrice(plan, interval).unitAmountCents;
  return PLAN_CATALOGUE[plan].seats ? unit * seats : unit;
}

/** "€19.00" — amounts in cents, shown in the catalogue currency. */
export function formatMoney(cents: number, currency: string = CATALOGUE_CURRENCY, locale = "en-GB"): string {
  return new Intl.NumberFormat(locale, { style: "currency", currency: currency.toUpperCase() }).format(cents / 100);
}

/**
 * What a plan unlocks in plain words, generated from the limits so the pricing
 * page can never disagree with what the guard enforces.
 */
export function describePlan(plan: Plan): string[] {
  const { limits, seats } = PLAN_CATALOGUE[plan];
  const n = (x: number) => x.toLocaleString("en-GB");
  const lines: string[] = [];
  lines.push("The map of every published edition, station pages and site reports");
  lines.push(
    limits.siteLookupsPerDay === null
      ? "Unlimited single-site lookups"
      : `${n(limits.siteLookupsPerDay)} single-site lookups a day`,
  );
  lines.push(
    limits.batchLookupMaxSites > 0
      ? `Batch lookups of up to ${n(limits.batchLookupMaxSites)} sites per file or API call`
      : "No batch lookups",
  );
  lines.push(limits.surfaceDownloads ? "Download edition surfaces as GeoTIFF and CSV" : "No surface downloads");
  lines.push(
    limits.stationDataDownloads
      ? "Download accepted station data as CSV and GeoJSON"
      : "No station data downloads",
  );
  lines.push(
    limits.apiKeys > 0
      ? `API access: up to ${n(limits.apiKeys)} keys, ${n(limits.apiRequestsPerDay)} requests a day${
          seats ? " shared by the organisation" : ""
        }`
      : `API without a key: ${n(limits.apiRequestsPerDay)} requests a day per address`,
  );
  if (seats) lines.push(`Seats for members: from ${n(seats.minSeats)} to ${n(seats.maxSeats)}, priced per seat`);
  return lines;
}
