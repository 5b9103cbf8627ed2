// scripts/krige.ts run as a subprocess, as users and the job worker run it.
import { spawn } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { createKrigingModel } from "@/lib/geostats";
import { maxRel, meuse } from "./fixtures";

const root = path.resolve(import.meta.dirname, "../../..");
const tsx = path.join(root, "node_modules", "tsx", "dist", "cli.mjs");
const tmp = mkdtempSync(path.join(os.tmpdir(), "rainprint-krige-"));

function krige(args: string[], stdin?: string): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const p = spawn(process.execPath, [tsx, "scripts/krige.ts", ...args], { cwd: root });
    let stdout = "";
    let stderr = "";
    p.stdout.on("data", (d) => (stdout += d));
    p.stderr.on("data", (d) => (stderr += d));
    p.on("error", reject);
    p.on("close", (code) => resolve({ code, stdout, stderr }));
    p.stdin.end(stdin ?? "");
  });
}

function jobFile(job: unknown, name: string): string {
  const f = path.join(tmp, name);
  writeFileSync(f, typeof job === "string" ? job : JSON.stringify(job));
  return f;
}

const m = meuse();
const points = m.points.x.map((x, i) => [x, m.points.y[i], m.points.value[i]]);
const targets = m.targets.x.map((x, i) => [x, m.targets.y[i]]);
const k = m.kriging[0];

describe("scripts/krige.ts", () => {
  it("krige a job file: meuse, spherical, nmax, with cross-validation — matches gstat [gstat]", async () => {
    const job = { coordinates: "planar", points, targets, variogram: k.variogram, maxNeighbors: m.nmax, crossValidate: true };
    const r = await krige([jobFile(job, "meuse.json")]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.variogram).toMatchObject({ ...k.variogram, fitted: false });
    expect(out.predictions).toHaveLength(targets.length);
    expect(maxRel(out.predictions.map((p: number[]) => p[0]), k.nmax.pred)).toBeLessThan(1e-6);
    expect(maxRel(out.predictions.map((p: number[]) => p[1]), k.nmax.var)).toBeLessThan(1e-6);
    expect(out.crossValidation.n).toBe(155);
    expect(out.crossValidation.points[0]).toHaveProperty("z");
  });

  it("reads the job on standard input and fits the variogram when only the model is given [gstat]", async () => {
    const job = { coordinates: "planar", points, targets: targets.slice(0, 5), variogram: { model: "spherical" } };
    const r = await krige([], JSON.stringify(job));
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    const f = m.fits.find((x) => x.model === "spherical" && x.fitMethod === 7);
    expect(out.variogram.fitted).toBe(true);
    expect(out.variogram.range).toBeCloseTo(f?.fitted.range as number, 3);
    expect(out.variogram.psill).toBeCloseTo(f?.fitted.psill as number, 6);
  });

  it("large target sets go through worker threads and give the same answers", async () => {
    const many: number[][] = [];
    for (let i = 0; i < 25_000; i++) many.push([178600 + (i % 250) * 10, 329600 + Math.floor(i / 250) * 40]);
    const job = { coordinates: "planar", points, targets: many, variogram: k.variogram, maxNeighbors: 12 };
    const r = await krige([jobFile(job, "large.json")]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    const ref = createKrigingModel({ coordinates: "planar", points: points.map((p) => [p[0], p[1]]), values: m.points.value, variogram: k.variogram, maxNeighbors: 12 }).predictMany(many);
    for (let i = 0; i < many.length; i += 97) {
      expect(out.predictions[i][0]).toBe(ref.value[i]);
      expect(out.predictions[i][1]).toBe((ref.variance as Float64Array)[i]);
    }
  });

  const bad: [string, unknown, RegExp][] = [
    ["missing fields", { coordinates: "planar", points }, /targets: /],
    ["non-finite numbers", '{"coordinates":"planar","points":[[0,0,1e999],[1,1,2]],"targets":[]}', /points\[0\]\[2\]: expected a finite number/],
    ["wrong point shape", { coordinates: "planar", points: [[0, 0]], targets: [] }, /points\[0\]/],
    ["bad coordinates", { coordinates: "utm", points, targets }, /coordinates: /],
    ["latitude out of range", { coordinates: "lonlat", points: [[0, 0, 1], [0, 91, 2]], targets: [[0, 0]], variogram: k.variogram }, /points\[1\]\[1\]: latitude/],
    ["drift of the wrong length", { coordinates: "planar", points, targets, variogram: k.variogram, drift: { points: [[1]], targets: [] } }, /drift\.points: must have one row per point/],
    ["partial variogram", { coordinates: "planar", points, targets, variogram: { model: "spherical", range: 5 } }, /variogram: give nugget, psill and range together/],
    ["unknown field", { coordinates: "planar", points, targets, maxNeighbours: 3 }, /unknown field\(s\) "maxNeighbours"/],
    ["too few points to fit", { coordinates: "planar", points: points.slice(0, 3), targets }, /points: 3 points are too few/],
    ["duplicate locations", { coordinates: "planar", points: [points[0], points[0], points[2]], targets, variogram: k.variogram }, /points: stations 0 and 1 are at the same location/],
    ["not JSON", "{oops", /job: not valid JSON/],
  ];
  for (const [what, job, message] of bad) {
    it(`a bad job exits non-zero naming the field: ${what}`, async () => {
      const r = await krige([jobFile(job, "bad.json")]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr).toMatch(message);
    });
  }
});
