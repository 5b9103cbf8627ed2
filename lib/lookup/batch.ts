import type { EditionInfo } from "@/lib/editions/predictor";

/** The first row's notice of a batch results file: source, units, method, licence, cautions, and the demo label. */
export function batchNotice(e: Pick<EditionInfo, "id" | "publishedAt" | "isDemo">): string {
  return [
    `Rainprint batch site lookup, edition ${e.id}${e.publishedAt ? ` (published ${e.publishedAt.toISOString().slice(0, 10)})` : ""}, made ${new Date().toISOString().slice(0, 10)}.`,
    "δ in ‰ vs VSMOW; precipitation in mm; sd = standard deviation; lower95/upper95 = the 95% interval; no elevation = sea-level equivalent.",
    "Regression-kriging (trend in |latitude|, latitude², elevation plus kriged residuals) computed at each site; δ2H = d-excess + 8·δ18O.",
    "Licence CC BY 4.0: credit Rainprint and the contributing stations.",
    "Estimates with stated uncertainty, not measurements; provenance conclusions need accredited laboratory analysis.",
    e.isDemo ? "synthetic demo data: invented for demonstration, not real measurements." : "",
  ]
    .filter(Boolean)
    .join(" ");
}
