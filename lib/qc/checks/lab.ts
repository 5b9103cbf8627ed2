// Checks on what the laboratory reported: analytical precision and normalisation scale.
import { t } from "../thresholds";
import type { CheckResult, QcContext, QcSample } from "../types";
import { fmt, given, num, result, shown } from "../util";

/** `precision`: stated 1σ of the sample or of the laboratory against acceptance limits [trade]. */
export function checkPrecision(s: QcSample, ctx: QcContext): CheckResult[] {
  const out: CheckResult[] = [];
  const limit18 = t("precisionMaxD18OPermil");
  const limit2 = t("precisionMaxD2HPermil");
  const sd18 = num(s.d18OSd);
  const sd2 = num(s.d2HSd);
  const lab18 = num(ctx.labPrecision?.d18O);
  const lab2 = num(ctx.labPrecision?.d2H);

  const odd: string[] = [];
  if (given(s.d18OSd) && (sd18 === null || sd18 < 0)) odd.push(`δ18O uncertainty ${shown(s.d18OSd)}`);
  if (given(s.d2HSd) && (sd2 === null || sd2 < 0)) odd.push(`δ2H uncertainty ${shown(s.d2HSd)}`);
  if (odd.length) {
    out.push(
      result("precision", "warn", `Not a valid 1σ uncertainty: ${odd.join("; ")}. Enter a number of per mil, 0 or more.`, {
        d18OSd: sd18,
        d2HSd: sd2,
      }),
    );
  }

  const over: string[] = [];
  const e18 = sd18 !== null && sd18 >= 0 ? sd18 : lab18;
  const e2 = sd2 !== null && sd2 >= 0 ? sd2 : lab2;
  const from18 = sd18 !== null && sd18 >= 0 ? "stated for this sample" : "the laboratory's stated precision";
  const from2 = sd2 !== null && sd2 >= 0 ? "stated for this sample" : "the laboratory's stated precision";
  if (e18 !== null && e18 > limit18) over.push(`δ18O ±${fmt(e18, 2)}‰ (${from18}) is above ±${limit18}‰`);
  if (e2 !== null && e2 > limit2) over.push(`δ2H ±${fmt(e2, 1)}‰ (${from2}) is above ±${limit2}‰`);
  if (over.length) {
    out.push(
      result(
        "precision",
        "warn",
        `The analytical uncertainty is larger than usual: ${over.join("; ")}, the usual acceptance limit. ` +
          "Such values carry less weight in judging the station; ask the laboratory whether a re-run is possible.",
        { d18OSd: e18, d2HSd: e2, d18OLimit: limit18, d2HLimit: limit2 },
      ),
    );
  }
  if (e18 === null && e2 === null && !odd.length) {
    out.push(
      result(
        "precision",
        "note",
        "No analytical uncertainty is given for this sample or its laboratory. Add the laboratory's stated 1σ precision if you have it.",
        { d18OSd: null, d2HSd: null },
      ),
    );
  }
  return out;
}

/** `scale`: δ values must be normalised to VSMOW–SLAP with two reference waters. */
export function checkScale(s: QcSample): CheckResult[] {
  const out: CheckResult[] = [];
  const raw = typeof s.scale === "string" ? s.scale.trim() : "";
  const key = raw.toLowerCase().replace(/[^a-z0-9]/g, "");
  const values = { scale: raw || null, referenceWaters: typeof s.referenceWaters === "string" ? s.referenceWaters : null };
  if (!key) {
    out.push(
      result(
        "scale",
        "warn",
        "The normalisation scale is not given. Values are only comparable on the VSMOW–SLAP scale; enter the scale the laboratory used.",
        values,
      ),
    );
  } else if (key.includes("pdb")) {
    out.push(
      result(
        "scale",
        "fail",
        `The scale "${raw}" is the carbonate scale (VPDB). Water δ18O and δ2H must be reported on the VSMOW–SLAP scale; ask the laboratory for those values.`,
        values,
      ),
    );
  } else if (key.includes("smow") && key.includes("slap")) {
    // VSMOW–SLAP (or VSMOW2–SLAP2): as it should be.
  } else if (key.includes("smow")) {
    out.push(
      result(
        "scale",
        "note",
        `The scale is given as "${raw}". Please confirm the values were normalised with two reference waters onto the VSMOW–SLAP scale.`,
        values,
      ),
    );
  } else {
    out.push(
      result(
        "scale",
        "warn",
        `The scale "${raw}" is not one we recognise. Values must be on the VSMOW–SLAP scale; check with the laboratory.`,
        values,
      ),
    );
  }
  const refs = typeof s.referenceWaters === "string" ? s.referenceWaters.trim() : "";
  if (!refs && !key.includes("pdb")) {
    out.push(
      result(
        "scale",
        "note",
        "The reference waters used for normalisation are not listed (e.g. VSMOW2 and SLAP2, or the laboratory's own calibrated waters). Add them if known.",
        values,
      ),
    );
  }
  return out;
}
