// The edition-surface download route (app/api/downloads/editions/[edition]/[file])
// with the plane reader replaced by a known plane: the gate, the 404s, and the
// GeoTIFF and CSV it answers, decoded with the `geotiff` package and papaparse.
// readSurfacePlane (the surface store reader) is replaced by known planes here.
import { fromArrayBuffer } from "geotiff";
import Papa from "papaparse";
import { beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { getDb } from "@/db";
import { editions } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import type { SurfacePlane } from "@/lib/downloads/surface";
import { freshDb } from "../helpers/db";

const state = vi.hoisted(() => ({ viewer: null as Viewer | null, planes: new Map<string, SurfacePlane>() }));

vi.mock("@/lib/auth/guard", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/auth/guard")>()),
  getViewer: async () => state.viewer,
}));
vi.mock("@/lib/downloads/editions", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/downloads/editions")>()),
  readSurfacePlane: async (editionId: string, variable: string, period: number) => state.planes.get(`${editionId}/${variable}/${period}`) ?? null,
}));

const viewer = (plan: Viewer["plan"]): Viewer => ({ id: "u", email: "u@x.example", name: null, role: "contributor", plan, planSource: "subscription", planOrganizationId: null, organizations: [] });

const grid = { lon0: 100.125, lat0: -10.125, dLon: 0.25, dLat: 0.25, nx: 4, ny: 3 };
const values = new Float32Array([-4, -4.5, Number.NaN, -5, -6, -6.5, -7, -7.5, -8, -8.5, -9, -9.5]);

async function get(edition: string, file: string): Promise<Response> {
  const { GET } = await import("@/app/api/downloads/editions/[edition]/[file]/route");
  return GET(new Request(`http://localhost/api/downloads/editions/${edition}/${file}`), { params: Promise.resolve({ edition, file }) });
}

beforeAll(async () => {
  await freshDb();
  await getDb().insert(editions).values([
    { id: "2026.12.1", status: "published", isDemo: true, publishedAt: new Date() },
    { id: "2027.1.1", status: "building", isDemo: true },
  ]);
  state.planes.set("2026.12.1/d18O/0", { grid, values, meta: { editionId: "2026.12.1", variable: "d18O", period: 0, plane: "value", isDemo: true } });
});
beforeEach(() => {
  state.viewer = viewer("researcher");
});

describe("edition surface downloads", () => {
  it("answers a georeferenced GeoTIFF as an attachment", async () => {
    const res = await get("2026.12.1", "d18O-annual.tif");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/tiff; application=geotiff");
    expect(res.headers.get("content-disposition")).toBe('attachment; filename="rainprint-2026.12.1-d18O-annual.tif"');
    const img = await (await fromArrayBuffer(await res.arrayBuffer())).getImage();
    expect([img.getWidth(), img.getHeight()]).toEqual([4, 3]);
    expect(img.getOrigin()).toEqual([100, -10, 0]);
    expect(img.getResolution()).toEqual([0.25, -0.25, 0]);
    const [band] = (await img.readRasters()) as unknown as Float32Array[];
    expect(Array.from(band)).toEqual(Array.from(values).map((v) => (Number.isNaN(v) ? -9999 : v)));
  });

  it("answers the CSV of the same plane, cells with a value only", async () => {
    const res = await get("2026.12.1", "d18O-annual.csv");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    const rows = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true }).data;
    expect(rows).toHaveLength(11);
    expect(rows[0]).toMatchObject({ lon: "100.125", lat: "-10.125", d18O_permil: "-4" });
  });

  it("refuses Open with 403 plan-required naming Researcher, before looking at the edition", async () => {
    state.viewer = viewer("open");
    const res = await get("no-such-edition", "d18O-annual.tif");
    expect(res.status).toBe(403);
    expect(await res.json()).toMatchObject({ code: "plan-required", detail: expect.stringContaining("Researcher plan or higher") });
    state.viewer = null;
    expect((await get("2026.12.1", "d18O-annual.tif")).status).toBe(401);
  });

  it("answers clear 404s for an unknown or unpublished edition, a bad file name and a missing surface", async () => {
    const detail = async (r: Response) => ((await r.json()) as { detail: string }).detail;
    const unknown = await get("2099.1.1", "d18O-annual.tif");
    expect(unknown.status).toBe(404);
    expect(await detail(unknown)).toMatch(/no published edition “2099\.1\.1”/);
    expect((await get("2027.1.1", "d18O-annual.tif")).status).toBe(404);
    const bad = await get("2026.12.1", "d18O-summer.tif");
    expect(bad.status).toBe(404);
    expect(await detail(bad)).toMatch(/Name the surface file like d18O-annual\.tif/);
    const missing = await get("2026.12.1", "dExcess-m07.tif");
    expect(missing.status).toBe(404);
    expect(await detail(missing)).toBe("Edition 2026.12.1 has no dExcess surface for month 07.");
  });
});
