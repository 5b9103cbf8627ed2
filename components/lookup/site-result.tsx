import { Alert } from "@/components/ui/alert";
import { DemoLabel } from "@/components/demo-label";
import type { SitePrediction } from "@/lib/editions/prediction";
import type { EditionInfo } from "@/lib/editions/predictor";
import { citationLine } from "@/lib/lookup/citation";
import { formatDms } from "@/lib/lookup/coordinates";
import { num } from "@/lib/lookup/format";

// The head of a lookup's answer: where, which edition, how far from data, and the citation line.

export function SiteSummary({ p, edition }: { p: SitePrediction; edition: EditionInfo }) {
  const s = p.site;
  return (
    <div className="flex flex-col gap-3" data-testid="site-summary">
      <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2 lg:grid-cols-4">
        <div>
          <dt className="text-ink-600">Site</dt>
          <dd className="font-medium">
            {formatDms(s.lat, "lat")} {formatDms(s.lon, "lon")}
            <span className="block text-xs font-normal text-ink-600 tabular-nums">
              {s.lat.toFixed(5)}, {s.lon.toFixed(5)}
            </span>
          </dd>
        </div>
        <div>
          <dt className="text-ink-600">Elevation</dt>
          <dd className="font-medium">{s.elevationM === null ? "not given (sea-level equivalent)" : `${s.elevationM} m a.s.l.`}</dd>
        </div>
        <div>
          <dt className="text-ink-600">Edition</dt>
          <dd className="font-medium" data-testid="edition-id">
            {edition.id}
            {edition.withdrawnAt ? <span className="ml-1 text-severity-fail">(withdrawn)</span> : null}
          </dd>
        </div>
        <div>
          <dt className="text-ink-600">Nearest station</dt>
          <dd className="font-medium">{num(s.nearestStationKm, 0)} km</dd>
        </div>
      </dl>
      {edition.isDemo ? <DemoLabel what="this edition is built from invented stations" /> : null}
      {s.elevationM === null ? (
        <Alert tone="info" title="Sea-level equivalent">
          No elevation was given, so these are sea-level-equivalent values: the trend&apos;s elevation term is taken at 0 m. Rain at a higher site is
          usually lighter (about −0.2 to −0.3 ‰ δ18O per 100 m); enter the site&apos;s elevation for a prediction at its height.
        </Alert>
      ) : null}
      {s.extrapolation ? (
        <Alert tone="warn" title="Extrapolation zone">
          The nearest station is {num(s.nearestStationKm, 0)} km away, beyond the {num(s.extrapolationKm, 0)} km within which this edition counts a site
          as informed by data. The values lean on the large-scale trend; the wide intervals say how little the stations constrain them here.
        </Alert>
      ) : null}
      {edition.withdrawnAt ? (
        <Alert tone="warn" title="This edition was withdrawn">
          {edition.withdrawnReason ?? "It stays citable, but a newer edition should be used."}
        </Alert>
      ) : null}
    </div>
  );
}

export function CitationBlock({ p, edition }: { p: SitePrediction; edition: EditionInfo }) {
  const line = citationLine(edition, p.site);
  return (
    <section aria-labelledby="cite-heading" className="flex flex-col gap-2">
      <h2 id="cite-heading" className="text-lg font-semibold">
        How to cite this lookup
      </h2>
      <p className="rounded border border-ink-200 bg-white p-3 font-mono text-xs leading-relaxed select-all" data-testid="citation">
        {line}
      </p>
    </section>
  );
}
