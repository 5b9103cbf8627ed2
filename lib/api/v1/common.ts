import { z } from "zod";
import { DATA_LICENCE as LICENCE } from "@/lib/downloads/licence";

// Shapes shared by several v1 endpoints, and the data terms every data answer
// carries. Schemas with a `.meta({ id })` become named components of the
// OpenAPI document.

/** The words every answer with invented data carries (see components/demo-label.tsx). */
export const SYNTHETIC_NOTICE = "synthetic demo data: invented for demonstration, not real measurements";

/**
 * The licence station data is published under, as the API states it. Built from the one
 * product-wide constant (lib/downloads/licence.ts) so the API, downloads and pages agree.
 */
export const DATA_LICENCE = {
  name: LICENCE.shortName,
  url: LICENCE.url,
  note: "Credit the station operator and Rainprint as given in `credit`.",
} as const;

export const licenceSchema = z
  .object({ name: z.string(), url: z.string(), note: z.string() })
  .meta({ id: "DataLicence", description: "The licence the data is published under." });

export const pageSchema = z
  .object({
    total: z.number().int().min(0).describe("Items matching the filters."),
    limit: z.number().int().min(1),
    offset: z.number().int().min(0),
    next: z.string().nullable().describe("Path of the next page with the same filters, or null on the last page."),
  })
  .meta({ id: "Page", description: "Where this page sits in the whole result." });

export const stationCodeParams = z.strictObject({
  code: z
    .string()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{1,39}$/, { error: "A station code is 2–40 letters, digits, hyphens or underscores, e.g. RP-EUR-001." })
    .describe("Station code, e.g. RP-EUR-001 (case-insensitive)."),
});

export const limitOffset = (defaultLimit: number, maxLimit: number) => ({
  limit: z.coerce
    .number({ error: "limit must be a whole number." })
    .int({ error: "limit must be a whole number." })
    .min(1, { error: "limit must be at least 1." })
    .max(maxLimit, { error: `limit can be at most ${maxLimit}.` })
    .default(defaultLimit)
    .describe(`Items per page, 1–${maxLimit}.`),
  offset: z.coerce
    .number({ error: "offset must be a whole number." })
    .int({ error: "offset must be a whole number." })
    .min(0, { error: "offset cannot be negative." })
    .max(10_000_000)
    .default(0)
    .describe("Items to skip (paging)."),
});

/** The path of the next page, or null. */
export function nextPage(path: string, query: Record<string, string | number | undefined>, total: number, limit: number, offset: number): string | null {
  if (offset + limit >= total) return null;
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries({ ...query, limit, offset: offset + limit })) if (v !== undefined && String(v) !== "") q.set(k, String(v));
  return `${path}?${q}`;
}

export function round(x: number | null, digits: number): number | null {
  if (x === null || !Number.isFinite(x)) return null;
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
