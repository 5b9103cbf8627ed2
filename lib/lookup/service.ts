import "server-only";
import { headers } from "next/headers";
import type { Viewer } from "@/lib/auth/guard";
import { clientAddress } from "@/lib/auth/options";
import { consumeUsage, peekUsage } from "@/lib/api/usage";
import { meterLimit, secondsToUtcMidnight } from "@/lib/api/quota";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import type { SitePrediction } from "@/lib/editions/prediction";
import { loadEditionPredictor, type LoadedEditionPredictor } from "@/lib/editions/predictor";
import { AppError } from "@/lib/errors";
import { CoordinateError, parseCoordinate, parseElevation } from "./coordinates";

// Site lookups in the browser (the lookup page and the site report): parse the
// form's query, enforce the plan's daily site-lookup cap on the server, predict.
// The cap is counted in the same `lookups:<partition>` row as the API's lookup
// meter, so an Open visitor has one daily allowance whichever way they ask.

export type LookupQuery = { lat?: string; lon?: string; elevation?: string; edition?: string };

export type ParsedLookup = { lat: number; lon: number; elevationM: number | null; edition: string | undefined };

export type LookupOutcome =
  | { kind: "empty" }
  | { kind: "invalid"; fields: Partial<Record<"lat" | "lon" | "elevation" | "edition", string>>; values: LookupQuery }
  | { kind: "refused"; message: string; values: LookupQuery }
  | {
      kind: "ok";
      values: LookupQuery;
      input: ParsedLookup;
      prediction: SitePrediction;
      predictor: LoadedEditionPredictor;
      /** Lookups left today on a capped plan (null: no cap). */
      left: number | null;
      cap: number | null;
    };

const EDITION_ID = /^(?:current|[0-9A-Za-z][0-9A-Za-z._-]{0,39})$/;

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

export function lookupValues(sp: Record<string, string | string[] | undefined>): LookupQuery {
  return { lat: first(sp.lat), lon: first(sp.lon), elevation: first(sp.elevation), edition: first(sp.edition) };
}

export function parseLookup(values: LookupQuery): { ok: true; input: ParsedLookup } | { ok: false; fields: Partial<Record<"lat" | "lon" | "elevation" | "edition", string>> } {
  const fields: Partial<Record<"lat" | "lon" | "elevation" | "edition", string>> = {};
  const attempt = <T,>(key: keyof typeof fields, f: () => T): T | undefined => {
    try {
      return f();
    } catch (e) {
      fields[key] = e instanceof CoordinateError ? e.message : String(e);
      return undefined;
    }
  };
  const lat = attempt("lat", () => parseCoordinate(values.lat ?? "", "lat"));
  const lon = attempt("lon", () => parseCoordinate(values.lon ?? "", "lon"));
  const elevationM = attempt("elevation", () => parseElevation(values.elevation));
  const edition = values.edition?.trim() || undefined;
  if (edition && !EDITION_ID.test(edition)) fields.edition = "An edition id looks like 2026.12.1.";
  if (Object.keys(fields).length || lat === undefined || lon === undefined) return { ok: false, fields };
  return { ok: true, input: { lat, lon, elevationM: elevationM ?? null, edition } };
}

/** The quota partition of a browser visitor (as lib/api/caller.ts counts API callers). */
function partition(viewer: Viewer | null, h: Headers): string {
  if (!viewer) return `anon:${clientAddress(h)}`;
  const org = viewer.plan === "institution" ? viewer.planOrganizationId : null;
  return org ? `org:${org}` : `user:${viewer.id}`;
}

/** Site lookups left today for this visitor (null = no cap on their plan). */
export async function lookupsLeft(viewer: Viewer | null): Promise<{ left: number; cap: number } | null> {
  const cap = meterLimit(viewer?.plan ?? "open", "lookups");
  if (cap === null) return null;
  const [used] = await peekUsage([`lookups:${partition(viewer, await headers())}`]);
  return { left: Math.max(0, cap - used), cap };
}

/**
 * One browser lookup: validates, checks the edition, counts one lookup on a capped plan
 * (nothing is counted for invalid input or an unknown edition), predicts.
 */
export async function browserLookup(viewer: Viewer | null, values: LookupQuery): Promise<LookupOutcome> {
  if (!values.lat && !values.lon) return { kind: "empty" };
  const parsed = parseLookup(values);
  if (!parsed.ok) return { kind: "invalid", fields: parsed.fields, values };
  const { input } = parsed;
  let predictor: LoadedEditionPredictor;
  try {
    predictor = await loadEditionPredictor(input.edition);
  } catch (e) {
    if (e instanceof AppError && e.type === "unknown-edition") return { kind: "invalid", fields: { edition: e.detail ?? e.title }, values };
    throw e;
  }
  const plan = viewer?.plan ?? "open";
  const cap = meterLimit(plan, "lookups");
  let left: number | null = null;
  if (cap !== null) {
    const now = new Date();
    const res = await consumeUsage([{ subject: `lookups:${partition(viewer, await headers())}`, cost: 1, limit: cap }], now);
    if (!res.ok) {
      const hours = Math.ceil(secondsToUtcMidnight(now) / 3600);
      return {
        kind: "refused",
        values,
        message: `The ${PLAN_CATALOGUE[plan].name} plan includes ${cap} site lookups a day, and today's are used up. They renew at 00:00 UTC (in about ${hours} hour${hours === 1 ? "" : "s"}). Paid plans have no daily cap.`,
      };
    }
    left = Math.max(0, cap - res.used[0]);
  }
  const prediction = predictor.predict({ lat: input.lat, lon: input.lon, elevationM: input.elevationM });
  return { kind: "ok", values, input, prediction, predictor, left, cap };
}

/** The query string of a lookup (for links between the lookup page, the report and the API). */
export function lookupHref(path: string, input: ParsedLookup, editionId?: string): string {
  const q = new URLSearchParams({ lat: String(input.lat), lon: String(input.lon) });
  if (input.elevationM !== null) q.set("elevation", String(input.elevationM));
  if (editionId ?? input.edition) q.set("edition", String(editionId ?? input.edition));
  return `${path}?${q}`;
}
