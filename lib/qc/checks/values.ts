// Checks on the δ values themselves: missing, units, swapped, sign, range.
import { t } from "../thresholds";
import type { CheckResult, QcSample } from "../types";
import { fmt, given, num, result, shown } from "../util";

const d = (d18O: number, d2H: number) => d2H - 8 * d18O; // Dansgaard (1964)

function inNaturalRange(d18O: number, d2H: number): boolean {
  return d18O >= t("d18OMinPermil") && d18O <= t("d18OMaxPermil") && d2H >= t("d2HMinPermil") && d2H <= t("d2HMaxPermil");
}
function typicalD(x: number): boolean {
  return x >= t("typicalDExcessMinPermil") && x <= t("typicalDExcessMaxPermil");
}
function plausibleD(x: number): boolean {
  return x >= t("plausibleDExcessMinPermil") && x <= t("plausibleDExcessMaxPermil");
}

/**
 * The value checks. `usable` is false when the δ values are missing, in the wrong units,
 * swapped, possibly sign-less or out of range — the checks that interpret the values are then
 * skipped, since they would mislead.
 */
export function checkValues(s: QcSample): { results: CheckResult[]; usable: boolean } {
  const out: CheckResult[] = [];
  const x = num(s.d18O);
  const y = num(s.d2H);

  // missing
  const missing: string[] = [];
  if (x === null) missing.push(given(s.d18O) ? `δ18O is not a number (${shown(s.d18O)})` : "δ18O is missing");
  if (y === null) missing.push(given(s.d2H) ? `δ2H is not a number (${shown(s.d2H)})` : "δ2H is missing");
  if (x === null || y === null) {
    out.push(
      result("missing", "fail", `${missing.join("; ")}. Enter both δ18O and δ2H in per mil (‰) vs VSMOW.`, {
        d18O: x,
        d2H: y,
      }),
    );
    return { results: out, usable: false };
  }

  // units: raw isotope ratios
  if (
    x >= t("ratio18OMin") &&
    x <= t("ratio18OMax") &&
    y >= t("ratio2HMin") &&
    y <= t("ratio2HMax")
  ) {
    out.push(
      result(
        "units",
        "fail",
        `δ18O ${x} and δ2H ${y} look like isotope ratios (¹⁸O/¹⁶O and ²H/¹H), not δ values. ` +
          "Report δ values in per mil (‰) relative to VSMOW, as the laboratory gives them.",
        { d18O: x, d2H: y, vsmowRatio18O: 2005.2e-6, vsmowRatio2H: 155.76e-6 },
      ),
    );
    return { results: out, usable: false };
  }

  // units: per mil entered as a fraction (divided by 1000)
  const x1000 = x * 1000;
  const y1000 = y * 1000;
  if (
    Math.abs(x1000) >= t("fractionMinAbsPermilAfterScaling") &&
    inNaturalRange(x1000, y1000) &&
    typicalD(d(x1000, y1000)) &&
    Math.abs(x) < 1 &&
    Math.abs(y) < 1
  ) {
    out.push(
      result(
        "units",
        "fail",
        `δ18O ${x} and δ2H ${y} look like fractions rather than per mil (‰): multiplied by 1000 they give ` +
          `${fmt(x1000, 2)}‰ and ${fmt(y1000, 1)}‰, ordinary values for rain. Enter the values in ‰. ` +
          "If they really are per mil values near zero, say so in the notes.",
        { d18O: x, d2H: y, d18OTimes1000: x1000, d2HTimes1000: y1000 },
      ),
    );
    return { results: out, usable: false };
  }

  // swapped columns
  const dEntered = d(x, y);
  const dSwapped = d(y, x);
  if (!plausibleD(dEntered) && typicalD(dSwapped) && Math.abs(x) > Math.abs(y)) {
    out.push(
      result(
        "swapped",
        "fail",
        `δ18O ${fmt(x, 2)}‰ and δ2H ${fmt(y, 1)}‰ look swapped: as entered the deuterium excess would be ` +
          `${fmt(dEntered, 1)}‰, impossible for rain; the other way round it is ${fmt(dSwapped, 1)}‰. ` +
          "Check which column is which. Other isotope checks were skipped until this is fixed.",
        { d18O: x, d2H: y, dExcessAsEntered: dEntered, dExcessIfSwapped: dSwapped },
      ),
    );
    return { results: out, usable: false };
  }

  let usable = true;
  // sign: minus signs dropped
  if (x >= t("signMinD18OPermil") && y > 0 && dEntered < t("typicalDExcessMinPermil") && typicalD(d(-x, -y))) {
    out.push(
      result(
        "sign",
        "warn",
        `δ18O ${fmt(x, 2)}‰ and δ2H ${fmt(y, 1)}‰ are both positive, which is rare for rain; with minus signs ` +
          `(${fmt(-x, 2)}‰, ${fmt(-y, 1)}‰) they would be ordinary values. Check that no minus signs were lost; ` +
          "if the values are right, the water was strongly evaporated. Other isotope checks were skipped until this is settled.",
        { d18O: x, d2H: y, dExcessAsEntered: dEntered, dExcessIfNegated: d(-x, -y) },
      ),
    );
    usable = false;
  }

  // range
  const bad: string[] = [];
  if (x < t("d18OMinPermil") || x > t("d18OMaxPermil"))
    bad.push(`δ18O ${fmt(x, 2)}‰ is outside ${t("d18OMinPermil")} to +${t("d18OMaxPermil")}‰`);
  if (y < t("d2HMinPermil") || y > t("d2HMaxPermil"))
    bad.push(`δ2H ${fmt(y, 1)}‰ is outside ${t("d2HMinPermil")} to +${t("d2HMaxPermil")}‰`);
  if (bad.length) {
    out.push(
      result(
        "range",
        "fail",
        `${bad.join("; ")}, the range of natural precipitation. Check for a typing, unit or instrument error.`,
        {
          d18O: x,
          d2H: y,
          d18OMin: t("d18OMinPermil"),
          d18OMax: t("d18OMaxPermil"),
          d2HMin: t("d2HMinPermil"),
          d2HMax: t("d2HMaxPermil"),
        },
      ),
    );
    usable = false;
  }
  return { results: out, usable };
}
