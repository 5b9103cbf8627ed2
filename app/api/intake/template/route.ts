import { templateCsv } from "@/lib/intake/csv";

// GET: the sample file template (public): Rainprint's column names and one example row.
export function GET(): Response {
  return new Response(templateCsv(), {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": 'attachment; filename="rainprint-samples-template.csv"', "Cache-Control": "public, max-age=3600" },
  });
}
