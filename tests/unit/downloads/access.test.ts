// The one download gate (lib/downloads/access.ts) against the plan catalogue:
// what each plan may download, and that a refusal names the plan that unlocks it.
import { describe, expect, it } from "vitest";
import type { Viewer } from "@/lib/auth/guard";
import { PLAN_CATALOGUE, PLAN_ORDER } from "@/lib/billing/plans";
import { downloadAccess, requireDownload } from "@/lib/downloads/access";
import { AppError } from "@/lib/errors";

const viewer = (plan: Viewer["plan"]): Viewer => ({
  id: "u1",
  email: "u1@example.test",
  name: null,
  role: "contributor",
  plan,
  planSource: plan === "open" ? "none" : "subscription",
  planOrganizationId: null,
  organizations: [],
});

describe("downloadAccess", () => {
  it("follows the catalogue's limits for every plan", () => {
    for (const plan of PLAN_ORDER) {
      expect(downloadAccess(plan, "station-data").allowed).toBe(PLAN_CATALOGUE[plan].limits.stationDataDownloads);
      expect(downloadAccess(plan, "surface").allowed).toBe(PLAN_CATALOGUE[plan].limits.surfaceDownloads);
    }
  });

  it("tells an Open account which plan unlocks the download", () => {
    const a = downloadAccess("open", "surface");
    expect(a).toMatchObject({ allowed: false, reason: "plan", requiredPlan: "researcher" });
    if (!a.allowed) expect(a.message).toMatch(/needs the Researcher plan or higher; your account is on the Open plan/);
  });

  it("asks a signed-out visitor to sign in, still naming the plan", () => {
    const a = downloadAccess(null, "station-data");
    expect(a).toMatchObject({ allowed: false, reason: "sign-in", requiredPlan: "researcher" });
  });
});

describe("requireDownload", () => {
  it("lets paid plans through and refuses Open with 403 plan-required", () => {
    expect(requireDownload(viewer("researcher"), "surface").plan).toBe("researcher");
    expect(requireDownload(viewer("institution"), "station-data").plan).toBe("institution");
    try {
      requireDownload(viewer("open"), "station-data");
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(AppError);
      expect((e as AppError).status).toBe(403);
      expect((e as AppError).type).toBe("plan-required");
      expect((e as AppError).detail).toMatch(/Researcher/);
    }
  });

  it("refuses a signed-out caller with 401", () => {
    expect(() => requireDownload(null, "surface")).toThrow(expect.objectContaining({ status: 401 }));
  });
});
