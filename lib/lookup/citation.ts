import { formatDms } from "./coordinates";

// The ready-to-paste line that cites a site lookup: which edition, which site,
// which method, the licence — and the demo label for invented data. Pure.

export interface CitableEdition {
  id: string;
  publishedAt: Date | string | null;
  isDemo: boolean;
}

export function citationLine(edition: CitableEdition, site: { lat: number; lon: number; elevationM: number | null }): string {
  const published = edition.publishedAt ? new Date(edition.publishedAt).toISOString().slice(0, 10) : "unpublished";
  const where = `${formatDms(site.lat, "lat")} ${formatDms(site.lon, "lon")} (${site.lat.toFixed(4)}, ${site.lon.toFixed(4)})`;
  const height = site.elevationM === null ? "sea-level equivalent" : `${site.elevationM} m a.s.l.`;
  const year = published.slice(0, 4);
  return (
    `Rainprint (${year === "unpu" ? "n.d." : year}). Predicted precipitation δ18O, δ2H and d-excess at ${where}, ${height}; ` +
    `edition ${edition.id} (published ${published}), regression-kriging with 95% intervals. Licence CC BY 4.0.` +
    (edition.isDemo ? " Synthetic demo data." : "")
  );
}
