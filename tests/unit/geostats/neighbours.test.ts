// The exact n-nearest search against brute force (sort all stations by (distance, index)).
import { describe, expect, it } from "vitest";
import { type StationSet, createStationSet } from "@/lib/geostats";
import { rng } from "./fixtures";

function bruteForce(set: StationSet, x: number, y: number, k: number): { index: number[]; distance: number[] } {
  const d = new Float64Array(set.count);
  set.searcher().all(x, y, d, 0);
  const order = Array.from({ length: set.count }, (_, i) => i).sort((a, b) => d[a] - d[b] || a - b);
  const idx = order.slice(0, Math.min(k, set.count));
  return { index: idx, distance: idx.map((i) => d[i]) };
}

function check(set: StationSet, targets: [number, number][], ks: number[]): void {
  const s = set.searcher();
  for (const k of ks) {
    const kk = Math.min(k, set.count);
    const idx = new Int32Array(kk);
    const dist = new Float64Array(kk);
    for (const [x, y] of targets) {
      const n = s.nearest(x, y, k, idx, dist, 0);
      const ref = bruteForce(set, x, y, k);
      expect(n).toBe(kk);
      expect(Array.from(idx), `k=${k} at (${x}, ${y})`).toEqual(ref.index);
      expect(Array.from(dist)).toEqual(ref.distance);
    }
  }
}

describe("exact nearest-neighbour search", () => {
  it("lon/lat stations over the whole globe, random targets", () => {
    const r = rng(1);
    const pts: [number, number][] = [];
    for (let i = 0; i < 400; i++) pts.push([360 * r() - 180, (Math.asin(2 * r() - 1) * 180) / Math.PI]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    const targets: [number, number][] = [];
    for (let i = 0; i < 150; i++) targets.push([360 * r() - 180, 180 * r() - 90]);
    check(set, targets, [1, 5, 16, 64, 400, 500]);
  });

  it("a cluster across the antimeridian (lon 170 … 180 and −180 … −170)", () => {
    const r = rng(2);
    const pts: [number, number][] = [];
    for (let i = 0; i < 200; i++) pts.push([((170 + 20 * r() + 180) % 360) - 180, 20 * r() - 10]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    const targets: [number, number][] = [
      [180, 0],
      [-180, 0],
      [179.999, 3],
      [-179.999, -3],
      [175, 5],
      [-175, -5],
      [0, 0],
      [90, 45],
    ];
    for (let i = 0; i < 60; i++) targets.push([((165 + 30 * r() + 180) % 360) - 180, 30 * r() - 15]);
    check(set, targets, [1, 8, 24, 200]);
  });

  it("near the poles (stations around the north pole, targets at and near both poles)", () => {
    const r = rng(3);
    const pts: [number, number][] = [];
    for (let i = 0; i < 150; i++) pts.push([360 * r() - 180, 80 + 10 * r()]);
    pts.push([0, 90]);
    pts.push([45, -89.5]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    const targets: [number, number][] = [
      [0, 90],
      [123, 90],
      [-60, 89.999],
      [179.9, 85],
      [-179.9, 85],
      [0, -90],
      [10, 70],
    ];
    for (let i = 0; i < 50; i++) targets.push([360 * r() - 180, 75 + 15 * r()]);
    check(set, targets, [1, 6, 20, 152]);
  });

  it("planar integer grid with many exact ties: ties are broken by station index", () => {
    const pts: [number, number][] = [];
    for (let i = 0; i < 15; i++) for (let j = 0; j < 15; j++) pts.push([i * 10, j * 10]);
    const set = createStationSet({ coordinates: "planar", points: pts });
    const targets: [number, number][] = [
      [75, 75],
      [70, 70],
      [5, 5],
      [0, 0],
      [-50, 200],
      [145, 5],
    ];
    check(set, targets, [1, 4, 5, 9, 12, 21, 225]);
  });

  it("targets exactly at stations find that station first at distance 0", () => {
    const r = rng(4);
    const pts: [number, number][] = [];
    for (let i = 0; i < 100; i++) pts.push([30 * r(), 30 * r() + 30]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    const idx = new Int32Array(3);
    const d = new Float64Array(3);
    for (let i = 0; i < 100; i++) {
      set.searcher().nearest(pts[i][0], pts[i][1], 3, idx, d, 0);
      expect(idx[0]).toBe(i);
      expect(d[0]).toBe(0);
    }
  });

  it("neighbourTable holds the same rows as single searches", () => {
    const r = rng(5);
    const pts: [number, number][] = [];
    for (let i = 0; i < 120; i++) pts.push([100 * r(), 100 * r()]);
    const set = createStationSet({ coordinates: "planar", points: pts });
    const targets = new Float64Array(40);
    for (let i = 0; i < 40; i++) targets[i] = 100 * r();
    const table = set.neighbourTable(targets, 7);
    expect(table.k).toBe(7);
    for (let t = 0; t < 20; t++) {
      const ref = bruteForce(set, targets[2 * t], targets[2 * t + 1], 7);
      expect(Array.from(table.index.subarray(t * 7, t * 7 + 7))).toEqual(ref.index);
    }
  });

  it("a hint (another target's neighbours) never changes the result", () => {
    const r = rng(6);
    const pts: [number, number][] = [];
    for (let i = 0; i < 300; i++) pts.push([360 * r() - 180, 160 * r() - 80]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    const s = set.searcher();
    const k = 12;
    const hint = new Int32Array(k);
    const hd = new Float64Array(k);
    const idx = new Int32Array(k);
    const d = new Float64Array(k);
    for (let t = 0; t < 200; t++) {
      // hints from a nearby target, a far target, and a random set of stations
      const x = 360 * r() - 180;
      const y = 160 * r() - 80;
      const kind = t % 3;
      if (kind === 0) s.nearest(x + 0.5, y - 0.3, k, hint, hd, 0);
      else if (kind === 1) s.nearest(-x, -y, k, hint, hd, 0);
      else for (let j = 0; j < k; j++) hint[j] = (j * 37 + t) % 300;
      s.nearest(x, y, k, idx, d, 0, hint, 0);
      expect(Array.from(idx)).toEqual(bruteForce(set, x, y, k).index);
    }
  });

  it("rejects targets with impossible latitudes", () => {
    const set = createStationSet({ coordinates: "lonlat", points: [[0, 0], [1, 1]] });
    expect(() => set.searcher().nearest(0, 91, 1, new Int32Array(1), new Float64Array(1))).toThrow(/latitude/);
  });
});
