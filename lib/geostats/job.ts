/**
 * The kriging job contract of `scripts/krige.ts` (and of anything else that wants to run a
 * self-contained kriging job): a zod schema for the job, and the runner that returns the result.
 * Uses the grid runner (worker threads) for large target sets, so it is not part of the pure
 * `lib/geostats` index.
 */
import { z } from "zod";
import { crossValidate } from "./crossval";
import { GeostatsError } from "./errors";
import { fitVariogram, fitVariogramBest } from "./fit";
import { krigeTargets } from "./grid-runner";
import { createKrigingModel } from "./kriging";
import { createStationSet } from "./stations";
import { VARIOGRAM_MODELS, type VariogramModel, empiricalVariogram } from "./variogram";

const finite = z.number({ error: "expected a finite number" });
const modelType = z.enum(VARIOGRAM_MODELS as [string, ...string[]], { error: `expected one of ${VARIOGRAM_MODELS.join(", ")}` });

export const krigeJobSchema = z
  .strictObject({
    coordinates: z.enum(["lonlat", "planar"], { error: 'expected "lonlat" or "planar"' }),
    points: z.array(z.tuple([finite, finite, finite], { error: "expected [x, y, value]" }), { error: "expected an array of [x, y, value]" }).min(1, "at least one point is needed"),
    targets: z.array(z.tuple([finite, finite], { error: "expected [x, y]" }), { error: "expected an array of [x, y]" }),
    variogram: z
      .strictObject({
        model: modelType.optional(),
        nugget: finite.min(0, "must not be negative").optional(),
        psill: finite.min(0, "must not be negative").optional(),
        range: finite.positive("must be positive").optional(),
      })
      .optional(),
    maxNeighbors: z.number().int("must be an integer").positive("must be positive").optional(),
    drift: z
      .strictObject({
        points: z.array(z.array(finite), { error: "expected an array of covariate rows" }),
        targets: z.array(z.array(finite), { error: "expected an array of covariate rows" }),
      })
      .optional(),
    crossValidate: z.boolean().optional(),
  })
  .superRefine((job, ctx) => {
    if (job.coordinates === "lonlat") {
      job.points.forEach((p, i) => {
        if (p[1] < -90 || p[1] > 90) ctx.addIssue({ code: "custom", path: ["points", i, 1], message: "latitude must be between -90 and 90" });
      });
      job.targets.forEach((p, i) => {
        if (p[1] < -90 || p[1] > 90) ctx.addIssue({ code: "custom", path: ["targets", i, 1], message: "latitude must be between -90 and 90" });
      });
    }
    const v = job.variogram;
    if (v) {
      const given = [v.nugget, v.psill, v.range].filter((x) => x !== undefined).length;
      if (given > 0 && given < 3) {
        ctx.addIssue({ code: "custom", path: ["variogram"], message: "give nugget, psill and range together (or only the model, to fit them)" });
      } else if (given === 3 && !v.model) {
        ctx.addIssue({ code: "custom", path: ["variogram", "model"], message: "the model is needed with nugget, psill and range" });
      } else if (given === 3 && !((v.nugget as number) + (v.psill as number) > 0)) {
        ctx.addIssue({ code: "custom", path: ["variogram", "psill"], message: "nugget + psill must be positive" });
      }
    }
    const d = job.drift;
    if (d) {
      if (d.points.length !== job.points.length) {
        ctx.addIssue({ code: "custom", path: ["drift", "points"], message: `must have one row per point (${job.points.length}), got ${d.points.length}` });
      }
      if (d.targets.length !== job.targets.length) {
        ctx.addIssue({ code: "custom", path: ["drift", "targets"], message: `must have one row per target (${job.targets.length}), got ${d.targets.length}` });
      }
      const q = d.points[0]?.length ?? 0;
      if (q === 0) ctx.addIssue({ code: "custom", path: ["drift", "points"], message: "each row needs at least one covariate" });
      d.points.forEach((r, i) => {
        if (r.length !== q) ctx.addIssue({ code: "custom", path: ["drift", "points", i], message: `expected ${q} covariates like the first row` });
      });
      d.targets.forEach((r, i) => {
        if (r.length !== q) ctx.addIssue({ code: "custom", path: ["drift", "targets", i], message: `expected ${q} covariates like drift.points` });
      });
    }
  });

export type KrigeJob = z.infer<typeof krigeJobSchema>;

export interface KrigeJobResult {
  variogram: VariogramModel & {
    fitted: boolean;
    /** Weighted SSE of the fit (gstat's SSErr), when fitted. */
    sse?: number;
    fitMethod?: number;
    warnings?: string[];
  };
  /** [value, variance] per target. */
  predictions: [number, number][];
  crossValidation?: {
    n: number;
    meanError: number;
    rmse: number;
    meanZ: number;
    meanZ2: number;
    /** Per point: observed, predicted (leave-one-out), variance, residual = observed − predicted, z. */
    points: { observed: number; predicted: number; variance: number; residual: number; z: number }[];
  };
}

/** A job that failed validation: one line per problem, each naming the field. */
export class KrigeJobError extends Error {
  readonly issues: string[];
  constructor(issues: string[]) {
    super(issues.join("\n"));
    this.name = "KrigeJobError";
    this.issues = issues;
  }
}

function pathToString(path: readonly PropertyKey[]): string {
  let s = "";
  for (const p of path) s += typeof p === "number" ? `[${p}]` : s ? `.${String(p)}` : String(p);
  return s || "job";
}

/** Validate a parsed JSON job; throws KrigeJobError listing every problem with its field. */
export function parseKrigeJob(raw: unknown): KrigeJob {
  const r = krigeJobSchema.safeParse(raw);
  if (r.success) return r.data;
  const issues = r.error.issues.slice(0, 20).map((i) => {
    if (i.code === "unrecognized_keys") return `${pathToString(i.path)}: unknown field(s) ${i.keys.map((k) => `"${k}"`).join(", ")}`;
    return `${pathToString(i.path)}: ${i.message}`;
  });
  if (r.error.issues.length > 20) issues.push(`… and ${r.error.issues.length - 20} more problems`);
  throw new KrigeJobError(issues);
}

export interface RunJobOptions {
  threads?: number;
  signal?: AbortSignal;
  /** Target count from which worker threads are used (default 20,000). */
  parallelFrom?: number;
}

export async function runKrigeJob(job: KrigeJob, options: RunJobOptions = {}): Promise<KrigeJobResult> {
  const stations = createStationSet({ coordinates: job.coordinates, points: job.points.map((p) => [p[0], p[1]]) });
  const values = job.points.map((p) => p[2]);
  const drift = job.drift ? { points: job.drift.points } : undefined;
  const v = job.variogram;
  let variogram: VariogramModel;
  let fitInfo: Pick<KrigeJobResult["variogram"], "fitted" | "sse" | "fitMethod" | "warnings">;
  if (v && v.model && v.nugget !== undefined && v.psill !== undefined && v.range !== undefined) {
    variogram = { model: v.model as VariogramModel["model"], nugget: v.nugget, psill: v.psill, range: v.range };
    fitInfo = { fitted: false };
  } else {
    const p = (job.drift?.points[0]?.length ?? 0) + 1;
    if (job.points.length < Math.max(5, p + 2)) {
      throw new GeostatsError("too-few-points", `points: ${job.points.length} points are too few to fit a variogram (need at least ${Math.max(5, p + 2)}); give the variogram instead`, "points");
    }
    const ev = empiricalVariogram({ stations, values, drift });
    const fit = v?.model ? fitVariogram(ev, { model: v.model as VariogramModel["model"] }) : fitVariogramBest(ev, {});
    variogram = fit.variogram;
    fitInfo = { fitted: true, sse: fit.sse, fitMethod: fit.fitMethod, warnings: fit.warnings };
  }
  const model = createKrigingModel({ stations, values, variogram, maxNeighbors: job.maxNeighbors ?? null, drift });

  const targets = job.targets.map((t) => [t[0], t[1]]);
  let predictions: [number, number][] = [];
  if (targets.length > 0) {
    const [out] = await krigeTargets({
      targets,
      models: model,
      drifts: [job.drift?.targets ?? null],
      precision: "float64",
      threads: options.threads,
      signal: options.signal,
      inlineBelow: options.parallelFrom ?? 20_000,
    });
    predictions = Array.from(out.value, (value, i) => [value, (out.variance as Float64Array)[i]]);
  }
  const result: KrigeJobResult = { variogram: { ...variogram, ...fitInfo }, predictions };
  if (job.crossValidate) {
    const cv = crossValidate(model);
    result.crossValidation = {
      n: cv.n,
      meanError: cv.meanError,
      rmse: cv.rmse,
      meanZ: cv.meanZ,
      meanZ2: cv.meanZ2,
      points: Array.from(cv.observed, (observed, i) => ({
        observed,
        predicted: cv.predicted[i],
        variance: cv.variance[i],
        residual: cv.residual[i],
        z: cv.zScore[i],
      })),
    };
  }
  return result;
}
