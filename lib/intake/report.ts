// The list of row problems as a CSV file for the person to work through in their sheet.
// Written like every CSV Rainprint makes (lib/downloads/csv.ts): cells a spreadsheet would run
// as formulas — including a formula the person typed into their own file — get a leading '.
// Pure and client-safe.
import { csvRow } from "@/lib/downloads/csv";
import type { SampleColumnName } from "./columns";

export type ProblemRow = { line: number; cells: Partial<Record<SampleColumnName, string>>; errors: { column: string; message: string }[] };

export function problemsCsv(rows: readonly ProblemRow[]): string {
  let out = csvRow(["file_line", "column", "value_as_entered", "problem"]);
  for (const r of rows)
    for (const e of r.errors)
      out += csvRow([r.line, e.column === "row" ? "(whole line)" : e.column, e.column === "row" ? "" : (r.cells[e.column as SampleColumnName] ?? ""), e.message]);
  return out;
}
