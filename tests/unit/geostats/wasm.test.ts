import { describe, expect, it } from "vitest";
import { GROUP, forwardSolveGroup } from "@/lib/geostats/linalg";
import { WasmGroupSolver, wasmSimdAvailable } from "@/lib/geostats/wasm-kernels";
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
});
