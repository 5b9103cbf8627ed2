/**
 * Several surfaces (kriging models on one StationSet) over the same targets: per block of
 * targets the neighbour search and target → station distances are done once and every model
 * only solves its own system. Used for site-lookup batches, by the grid workers and by the CLI.
 */
import { GeostatsError } from "./errors";
import { type GridSpec, gridCellCentres } from "./grid";
import { type KrigingEvaluator, type KrigingModel, readTargetDrift, sortNeighbourRow } from "./kriging";
import { permuteRows, scatter, spatialOrder } from "./order";
import { type NeighbourSearcher, type NeighbourTable, type PointsInput, type StationSet, readPoints } from "./stations";

/** Where the targets come from: explicit points, or the cells of a grid. */
export type TargetSource = { kind: "points"; xy: Float64Array } | { kind: "grid"; grid: GridSpec };

export interface SurfaceOutput {
  value: Float64Array | Float32Array;
  variance: Float64Array | Float32Array | null;
}

const BLOCK = 256;

export class SurfaceBatch {
  readonly stations: StationSet;
  readonly models: readonly KrigingModel[];
  private readonly evaluators: KrigingEvaluator[];
  private readonly searcher: NeighbourSearcher;
  private readonly kLocal: number;
  private readonly anyGlobal: boolean;
  private readonly blockXY: Float64Array;
  private readonly table: NeighbourTable | null;
  private readonly rows: Float64Array | null;
  private readonly hint: Int32Array;
  private hintValid = false;
  /** The table's rows sorted by station index, with hashes (shared by the models). */
  private readonly sorted: { index: Int32Array; distance: Float64Array; hash: Int32Array } | null;

  constructor(models: readonly KrigingModel[], searcher?: NeighbourSearcher) {
    if (models.length === 0) throw new GeostatsError("invalid-input", "at least one model is needed", "models");
    const stations = models[0].stations;
    for (const m of models) {
      if (m.stations !== stations) {
        throw new GeostatsError("invalid-input", "all models of a batch must share one StationSet (pass `stations` to createKrigingModel)", "models");
      }
    }
    this.stations = stations;
    this.models = models;
    this.searcher = searcher ?? stations.searcher();
    // bound the memory of the factorisation caches: about 48 MB per batch, 16 … 256 slots each
    const slotBytes = (m: KrigingModel) => 8 * (m.neighbourCount * (m.neighbourCount + 4) + (m.driftCovariates + 1) * (m.neighbourCount + 3));
    const perModel = 48e6 / models.reduce((a, m) => a + (m.isGlobal ? 0 : slotBytes(m)), 1);
    const slots = Math.max(16, Math.min(256, 2 ** Math.floor(Math.log2(Math.max(1, perModel)))));
    this.evaluators = models.map((m) => {
      const e = m.createEvaluator(slots);
      e.setSearcher(this.searcher);
      return e;
    });
    this.kLocal = Math.max(0, ...models.filter((m) => !m.isGlobal).map((m) => m.neighbourCount));
    this.anyGlobal = models.some((m) => m.isGlobal);
    this.blockXY = new Float64Array(2 * BLOCK);
    const n = stations.count;
    this.table = this.kLocal > 0 ? { targets: BLOCK, k: this.kLocal, index: new Int32Array(BLOCK * this.kLocal), distance: new Float64Array(BLOCK * this.kLocal) } : null;
    this.rows = this.anyGlobal ? new Float64Array(BLOCK * n) : null;
    this.hint = new Int32Array(Math.max(1, this.kLocal));
    this.sorted =
      this.kLocal > 0 && models.filter((m) => !m.isGlobal && m.neighbourCount === this.kLocal).length > 1
        ? { index: new Int32Array(BLOCK * this.kLocal), distance: new Float64Array(BLOCK * this.kLocal), hash: new Int32Array(BLOCK) }
        : null;
  }

  /** Factorisations done / reused so far, summed over the models. */
  cacheStats(): { factorisations: number; reuses: number } {
    let f = 0;
    let r = 0;
    for (const e of this.evaluators) {
      f += e.factorisations;
      r += e.reuses;
    }
    return { factorisations: f, reuses: r };
  }

  /**
   * Predict targets [from, to) for every model. `drifts[i]` holds model i's target covariates
   * (targets × q, absolute index) or null; `outputs[i]` receives model i's planes at
   * [outOffset + t − from]. Masked targets (mask[t] = 0) get NaN.
   */
  run(
    source: TargetSource,
    from: number,
    to: number,
    drifts: readonly (Float64Array | null)[],
    outputs: readonly SurfaceOutput[],
    outOffset = 0,
    mask: Uint8Array | null = null,
  ): void {
    const n = this.stations.count;
    for (let b = from; b < to; b += BLOCK) {
      const e = Math.min(to, b + BLOCK);
      let xy: Float64Array;
      let xyBase: number;
      if (source.kind === "grid") {
        gridCellCentres(source.grid, b, e, this.blockXY);
        xy = this.blockXY;
        xyBase = b;
      } else {
        xy = source.xy;
        xyBase = 0;
      }
      // neighbours and distances once per target for all models; each search is seeded with
      // the previous target's neighbours (adjacent cells share most of them)
      const k = this.kLocal;
      const table = this.table;
      let prev = -1;
      for (let t = b; t < e; t++) {
        if (mask && mask[t] === 0) continue;
        const x = xy[2 * (t - xyBase)];
        const y = xy[2 * (t - xyBase) + 1];
        if (table) {
          if (prev < 0 && this.hintValid) {
            this.searcher.nearest(x, y, k, table.index, table.distance, (t - b) * k, this.hint, 0);
          } else if (prev >= 0) {
            this.searcher.nearest(x, y, k, table.index, table.distance, (t - b) * k, table.index, (prev - b) * k);
          } else {
            this.searcher.nearest(x, y, k, table.index, table.distance, (t - b) * k);
          }
          prev = t;
        }
        if (this.rows) this.searcher.all(x, y, this.rows, (t - b) * n);
        if (this.sorted && table) {
          const o = (t - b) * k;
          this.sorted.hash[t - b] = sortNeighbourRow(table.index, table.distance, o, k, this.sorted.index, this.sorted.distance, o);
        }
      }
      if (table && prev >= 0) {
        // carry the last neighbours over to the next block
        this.hint.set(table.index.subarray((prev - b) * k, (prev - b + 1) * k));
        this.hintValid = true;
      }
      for (let i = 0; i < this.models.length; i++) {
        const out = outputs[i];
        this.evaluators[i].run({
          xy,
          xyBase,
          from: b,
          to: e,
          drift: drifts[i] ?? null,
          table: this.table,
          rows: this.rows,
          base: b,
          value: out.value,
          variance: out.variance,
          outOffset: outOffset + b - from,
          mask,
          sorted: this.sorted,
        });
      }
    }
  }
}

/**
 * Predict several surfaces at many targets, sharing the neighbour search: returns one
 * {value, variance} pair of planes per model. `drifts[i]` gives model i's target covariates
 * (rows of q numbers or a flat targets × q array) when it has drift.
 */
export function predictSurfaces(
  models: readonly KrigingModel[],
  targets: PointsInput,
  options: { drifts?: readonly (ArrayLike<ArrayLike<number>> | Float64Array | Float32Array | null | undefined)[]; variance?: boolean; precision?: "float64" | "float32" } = {},
): SurfaceOutput[] {
  const xy = targets instanceof Float64Array ? targets : readPoints(targets, "targets");
  const t = xy.length >> 1;
  const Arr = options.precision === "float32" ? Float32Array : Float64Array;
  const wantVar = options.variance ?? true;
  const drifts = models.map((m, i) => readTargetDrift(options.drifts?.[i] ?? undefined, t, m.driftCovariates));
  const outputs = models.map(() => ({ value: new Arr(t), variance: wantVar ? new Arr(t) : null }));
  // work in the targets' kd order (neighbouring targets reuse factorised systems), answer in theirs
  const order = spatialOrder(xy);
  if (!order) {
    new SurfaceBatch(models).run({ kind: "points", xy }, 0, t, drifts, outputs);
    return outputs;
  }
  const sortedDrifts = drifts.map((d, i) => (d ? permuteRows(d, order, models[i].driftCovariates) : null));
  new SurfaceBatch(models).run({ kind: "points", xy: permuteRows(xy, order, 2) }, 0, t, sortedDrifts, outputs);
  return unpermute(outputs, order);
}

/** Planes computed in `order`, returned in the caller's order. */
export function unpermute(outputs: SurfaceOutput[], order: Int32Array): SurfaceOutput[] {
  return outputs.map((o) => ({
    value: scatter(o.value, order, (n) => (o.value instanceof Float32Array ? new Float32Array(n) : new Float64Array(n))),
    variance: o.variance ? scatter(o.variance, order, (n) => (o.variance instanceof Float32Array ? new Float32Array(n) : new Float64Array(n))) : null,
  }));
}
