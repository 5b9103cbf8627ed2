// The intake runs lib/qc with a reduced `otherBatchSamples` per sample (lib/intake/context.ts).
// Brute-force cross-check: the findings must equal lib/qc's own runBatchChecks over the
// whole batch, on a batch built to contain duplicates, overlaps, gaps, long periods,
// copied δ pairs across stations and unreadable dates.
import { describe, expect, it } from "vitest";
import { checkSamples, relevantOthers, type StationContext, type StationForChecks } from "@/lib/intake/context";
import type { ParsedSample } from "@/lib/intake/schemas";
import { runBatchChecks, type QcContext } from "@/lib/qc";

const TODAY = "2026-11-20";
const stations: StationForChecks[] = [
  { id: "s1", code: "A-001", lat: 47.4, lon: 8.5, elevationM: 450, samplingInterval: "monthly" },
  { id: "s2", code: "B-002", lat: 46.9, lon: 7.4, elevationM: 540, samplingInterval: "monthly" },
];
// Stored periods: 2016–2018 monthly (before a gap), one that duplicates a batch month, one that overlaps.
const stored = [
  ...Array.from({ length: 36 }, (_, i) => {
    const [startDate, endDate] = month(2016 + Math.floor(i / 12), (i % 12) + 1);
    return { startDate, endDate, ref: `accepted ${startDate.slice(0, 7)}` };
  }),
  { startDate: "2022-06-01", endDate: "2022-07-01", ref: "pending 2022-06" },
  { startDate: "2024-07-10", endDate: "2024-08-10", ref: "accepted 2024-07" },
];
const ctx: StationContext = { history: [], storedPeriods: stored, line: null };
const contexts = new Map(stations.map((s) => [s.id, ctx]));

function month(y: number, m: number): [string, string] {
  const a = `${y}-${String(m).padStart(2, "0")}-01`;
  const b = m === 12 ? `${y + 1}-01-01` : `${y}-${String(m + 1).padStart(2, "0")}-01`;
  return [a, b];
}

function sample(stationCode: string, [startDate, endDate]: [string, string], d18O: number, d2H: number): ParsedSample {
  return { stationCode, startDate, endDate, d18O, d2H, amountMm: 50, d18OSd: 0.1, d2HSd: 1, method: null, laboratory: null, scale: "VSMOW-SLAP", referenceWaters: null, notes: null };
}

describe("intake checks with a reduced neighbourhood", () => {
  it("give exactly lib/qc's runBatchChecks findings", () => {
    const items: { sample: ParsedSample; stationId: string; ref: string }[] = [];
    let k = 0;
    const push = (sid: string, code: string, p: [string, string], x: number, y: number) => items.push({ sample: sample(code, p, x, y), stationId: sid, ref: `line ${++k}` });
    for (let y = 2021; y <= 2025; y++)
      for (let m = 1; m <= 12; m++) {
        if ((y * 12 + m) % 7 === 0) continue; // gaps
        const x = -9 + ((y * 13 + m * 7) % 11) / 4;
        push("s1", "A-001", month(y, m), x, Math.round((8 * x + 10 + ((m * 5) % 3)) * 10) / 10);
        if (m % 3 === 0) push("s2", "B-002", month(y, m), x - 1, 8 * (x - 1) + 12);
      }
    push("s1", "A-001", month(2023, 4), -7, -46); // duplicate period
    push("s1", "A-001", ["2023-06-15", "2023-07-15"], -6, -38); // overlap
    push("s2", "B-002", ["2022-01-01", "2023-03-01"], -8, -54); // a 14-month period
    push("s2", "B-002", month(2024, 2), items[5].sample.d18O, items[5].sample.d2H); // copied δ pair from the other station
    push("s1", "A-001", ["2019-03-01", "2019-04-01"], -9.5, -66); // a gap of two months after the stored record
    push("s1", "A-001", ["2012-01-01", "2012-02-01"], -9.7, -68); // far from everything
    const mine = checkSamples(items, new Map(stations.map((s) => [s.id, s])), contexts, TODAY);
    // Reference: lib/qc over the whole batch (each station's samples see all others).
    const qc = items.map((it) => ({ ref: it.ref, stationId: it.stationId, ...it.sample }));
    for (const st of stations) {
      const base: Omit<QcContext, "otherBatchSamples"> = { today: TODAY, station: st, history: ctx.history, storedPeriods: ctx.storedPeriods, stationLine: null };
      const idx = items.map((it, i) => (it.stationId === st.id ? i : -1)).filter((i) => i >= 0);
      const full = runBatchChecks(qc, base);
      for (const i of idx) expect(mine[i].checks, items[i].ref).toEqual(full[i]);
    }
    const codes = mine.flatMap((m) => m.checks!.map((c) => c.code));
    expect(codes).toContain("duplicate");
    expect(codes).toContain("period");
    expect(mine.some((m) => m.checks!.some((c) => c.code === "duplicate" && c.message.includes("already stored")))).toBe(true);
    // The neighbourhood stays small for monthly records.
    const sizes = relevantOthers(qc).map((r) => r.length);
    expect(Math.max(...sizes)).toBeLessThan(40);
  });
});

describe("reduced neighbourhood on random batches", () => {
  // Random periods of 1–400 days (weekly, monthly, long and overlapping), repeated δ pairs,
  // stored periods on both sides; 20 seeds. Each must equal runBatchChecks exactly.
  it("equals runBatchChecks for 20 random batches", () => {
    for (let seed = 1; seed <= 20; seed++) {
      let state = seed * 7919;
      const rnd = () => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 4294967296);
      const day0 = Date.UTC(2020, 0, 1) / 86_400_000;
      const iso = (d: number) => new Date(d * 86_400_000).toISOString().slice(0, 10);
      const items: { sample: ParsedSample; stationId: string; ref: string }[] = [];
      const pairs: [number, number][] = [];
      for (let k = 0; k < 60; k++) {
        const st = stations[rnd() < 0.6 ? 0 : 1];
        const start = day0 + Math.floor(rnd() * 1500);
        const len = rnd() < 0.1 ? 40 + Math.floor(rnd() * 360) : 1 + Math.floor(rnd() * 35);
        const pair: [number, number] = pairs.length && rnd() < 0.2 ? pairs[Math.floor(rnd() * pairs.length)] : [Math.round((-12 + rnd() * 8) * 100) / 100, 0];
        if (pair[1] === 0) pair[1] = Math.round((8 * pair[0] + 10 + rnd() * 4) * 10) / 10;
        pairs.push(pair);
        items.push({ sample: sample(st.code, [iso(start), iso(start + len)], pair[0], pair[1]), stationId: st.id, ref: `line ${k + 2}` });
      }
      const storedHere: StationContext = {
        history: [],
        storedPeriods: Array.from({ length: 12 }, (_, k) => {
          const start = day0 - 200 + Math.floor(rnd() * 1900);
          return { startDate: iso(start), endDate: iso(start + 10 + Math.floor(rnd() * 40)), ref: `stored ${k}` };
        }),
        line: null,
      };
      const ctxs = new Map(stations.map((s) => [s.id, { ...storedHere }]));
      const mine = checkSamples(items, new Map(stations.map((s) => [s.id, s])), ctxs, TODAY);
      const qc = items.map((it) => ({ ref: it.ref, stationId: it.stationId, ...it.sample }));
      for (const st of stations) {
        const full = runBatchChecks(qc, { today: TODAY, station: st, history: [], storedPeriods: storedHere.storedPeriods, stationLine: null });
        items.forEach((it, i) => {
          if (it.stationId === st.id) expect(mine[i].checks, `seed ${seed}, ${it.ref}`).toEqual(full[i]);
        });
      }
    }
  });
});
