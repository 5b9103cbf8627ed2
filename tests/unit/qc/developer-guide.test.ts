import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { STATION_MEAN_RULES } from "@/lib/isotopes";
import { CHECK_CODES, CHECK_THRESHOLDS } from "@/lib/qc";

// Keeps DEVELOPERS.md true: every check code, threshold and station-mean rule is documented there.
const guide = readFileSync(path.resolve(import.meta.dirname, "../../../DEVELOPERS.md"), "utf8");

describe("DEVELOPERS.md lists the science", () => {
  it("names every check code", () => {
    for (const code of CHECK_CODES) expect(guide, code).toContain(`\`${code}\``);
  });
  it("names every threshold", () => {
    for (const key of Object.keys(CHECK_THRESHOLDS)) expect(guide, key).toContain(`\`${key}\``);
  });
  it("names every station-mean rule with its default", () => {
    for (const [key, rule] of Object.entries(STATION_MEAN_RULES)) {
      expect(guide, key).toMatch(new RegExp(`\`${key}\` \\| ${rule.value}\\b`));
    }
  });
});
