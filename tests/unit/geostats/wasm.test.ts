import { describe, expect, it } from "vitest";
import { GROUP, cholesky, forwardSolveGroup } from "@/lib/geostats/linalg";
import { WasmFactoriser, WasmGroupSolver, wasmSimdAvailable } from "@/lib/geostats/wasm-kernels";
import { rng } from "./fixtures";

describe("WebAssembly SIMD forward solve", () => {
  it("is available on Node 20 and gives bit-identical results to the TypeScript kernel", () => {
    expect(wasmSimdAvailable()).toBe(true);
    expect(GROUP).toBe(8);
    const r = rng(3);
    for (const [m, stride] of [[1, 1], [7, 9], [64, 64], [301, 305]]) {
      const L = new Float64Array(stride * stride);
      const inv = new Float64Array(m);
      for (let i = 0; i < m; i++) {
        for (let k = 0; k < i; k++) L[i * stride + k] = (r() - 0.5) * 0.1;
        L[i * stride + i] = 0.5 + r();
        inv[i] = 1 / L[i * stride + i];
      }
      const b = Float64Array.from({ length: 8 * m }, () => r() - 0.5);
      const original = Float64Array.from(b);
      const js = Float64Array.from(b);
      forwardSolveGroup(L, inv, m, stride, js);
      const solver = WasmGroupSolver.create(L, inv, m, stride);
      expect(solver).not.toBeNull();
      solver?.solve(b);
      expect(Array.from(b)).toEqual(Array.from(js));
      // and it really solves L·x = b: check one right-hand side
      const x = Array.from({ length: m }, (_, i) => js[8 * i + 3]);
      for (let i = 0; i < m; i++) {
        let s = 0;
        for (let k = 0; k <= i; k++) s += L[i * stride + k] * x[k];
        expect(s).toBeCloseTo(original[8 * i + 3], 10);
      }
    }
  });

  it("the Cholesky kernel is bit-identical to the TypeScript one and reports the same singular row", () => {
    const r = rng(4);
    const f = WasmFactoriser.create();
    expect(f).not.toBeNull();
    for (const m of [1, 2, 3, 5, 8, 13, 24, 32, 65, 150]) {
      // an exponential covariance matrix of random points (SPD)
      const pts = Array.from({ length: m }, () => [1000 * r(), 1000 * r()]);
      const a = new Float64Array(m * m);
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) a[i * m + j] = i === j ? 1.2 : Math.exp(-Math.hypot(pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]) / 300);
      const js = Float64Array.from(a);
      const wa = Float64Array.from(a);
      expect(cholesky(js, m, m)).toBe(-1);
      expect(f?.cholesky(wa, m, 1e-13)).toBe(-1);
      for (let i = 0; i < m; i++) for (let j = 0; j <= i; j++) expect(wa[i * m + j]).toBe(js[i * m + j]);
      // eight right-hand sides with the factor just computed
      const inv = Float64Array.from({ length: m }, (_, i) => 1 / js[i * m + i]);
      const b = Float64Array.from({ length: 8 * m }, () => r());
      const b2 = Float64Array.from(b);
      f?.forwardSolve8(inv, b);
      forwardSolveGroup(js, inv, m, m, b2);
      expect(Array.from(b)).toEqual(Array.from(b2));
    }
    // a singular matrix (two identical rows) fails at the same row in both
    const s = new Float64Array([1, 1, 0.5, 1, 1, 0.5, 0.5, 0.5, 1]);
    expect(f?.cholesky(Float64Array.from(s), 3, 1e-13)).toBe(cholesky(Float64Array.from(s), 3, 3));
    expect(cholesky(Float64Array.from(s), 3, 3)).toBe(1);
  });
});
