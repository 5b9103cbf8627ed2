// The problems file neutralises formula cells (OWASP "CSV injection" guidance [trade]) and keeps numbers as numbers.
import { describe, expect, it } from "vitest";
import { problemsCsv } from "@/lib/intake/report";

describe("problemsCsv", () => {
  it("writes one line per problem with the value as entered, formulas made inert", () => {
    const csv = problemsCsv([
      { line: 2, cells: { d18O_permil: '=HYPERLINK("http://example.invalid","x")' }, errors: [{ column: "d18O_permil", message: "looks like a spreadsheet formula" }] },
      { line: 7, cells: { d2H_permil: "-54,8" }, errors: [{ column: "d2H_permil", message: "uses a decimal comma" }, { column: "row", message: "This line repeats line 3 exactly" }] },
    ]);
    const lines = csv.trim().split("\r\n");
    expect(lines[0]).toBe("file_line,column,value_as_entered,problem");
    expect(lines[1]).toBe(`2,d18O_permil,"'=HYPERLINK(""http://example.invalid"",""x"")",looks like a spreadsheet formula`);
    expect(lines[2]).toBe(`7,d2H_permil,"'-54,8",uses a decimal comma`);
    expect(lines[3]).toBe("7,(whole line),,This line repeats line 3 exactly");
  });
});
