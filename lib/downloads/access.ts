import "server-only";
import type { Plan } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { lowestPlanAllowing, PLAN_CATALOGUE, planLimits, type PlanLimits } from "@/lib/billing/plans";
import { AppError, errors } from "@/lib/errors";

// THE place that decides who may download what. Every download route (station
// data, edition surfaces) calls requireDownload first; pages call
// downloadAccess to show the same answer. What each plan allows comes from the
// plan catalogue (lib/billing/plans.ts), read through planLimits, and the plan
// itself from the guard, which reads it from the database on every request.

export type DownloadKind = "station-data" | "surface";

const KINDS: Record<DownloadKind, { what: string; allows: (l: PlanLimits) => boolean }> = {
  "station-data": { what: "Downloading accepted station data (CSV and GeoJSON)", allows: (l) => l.stationDataDownloads },
  surface: { what: "Downloading edition surfaces (GeoTIFF and CSV)", allows: (l) => l.surfaceDownloads },
};

export type DownloadAccess =
  | { allowed: true }
  | { allowed: false; reason: "sign-in" | "plan"; requiredPlan: Plan | null; message: string };

/** May someone on `plan` (null = signed out) download `kind`? With the message to show when not. */
export function downloadAccess(plan: Plan | null, kind: DownloadKind): DownloadAccess {
  const k = KINDS[kind];
  const required = lowestPlanAllowing(k.allows);
  const needs = required ? `the ${PLAN_CATALOGUE[required].name} plan or higher` : "a plan that is not offered";
  if (plan === null) return { allowed: false, reason: "sign-in", requiredPlan: required, message: `${k.what} needs ${needs}. Sign in first.` };
  if (k.allows(planLimits(plan))) return { allowed: true };
  return {
    allowed: false,
    reason: "plan",
    requiredPlan: required,
    message: `${k.what} needs ${needs}; your account is on the ${PLAN_CATALOGUE[plan].name} plan. See /pricing for what each plan includes.`,
  };
}

/** For download routes: the viewer, or 401 (signed out) / 403 plan-required naming the plan that unlocks it. */
export function requireDownload(viewer: Viewer | null, kind: DownloadKind): Viewer {
  const access = downloadAccess(viewer?.plan ?? null, kind);
  if (access.allowed) return viewer!;
  if (access.reason === "sign-in") throw errors.unauthenticated(access.message);
  throw new AppError("plan-required", { detail: access.message });
}
