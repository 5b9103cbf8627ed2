import type { Metadata } from "next";
import { ElevationToggle, ElevationUpload } from "@/components/editions/elevation-upload";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { listElevationModels } from "@/lib/editions/elevation-models";
import type { LonLatGrid } from "@/lib/geo";

export const metadata: Metadata = { title: "Elevation models" };
export const dynamic = "force-dynamic";

export default async function ElevationPage() {
  await requirePageViewer({ roles: ["admin"], path: "/admin/elevation" });
  const models = await listElevationModels();
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Elevation models"
        lead="Without an elevation model, edition grids are sea-level-equivalent: the trend's elevation term is taken at 0 m, and site lookups apply the fitted elevation gradient at the site's own elevation. With an active model, new builds use each cell's elevation."
      />
      <section aria-labelledby="upload">
        <h2 id="upload" className="mb-3 text-lg font-semibold">
          Upload
        </h2>
        <ElevationUpload />
      </section>
      <section aria-labelledby="models">
        <h2 id="models" className="mb-3 text-lg font-semibold">
          Stored models
        </h2>
        {models.length === 0 ? <p className="text-ink-700">None: builds are sea-level-equivalent.</p> : null}
        <ul className="flex flex-col gap-3" data-testid="elevation-models">
          {models.map((m) => {
            const g = m.grid as LonLatGrid;
            return (
              <li key={m.id} className="flex flex-wrap items-center gap-4 rounded border border-ink-200 p-3 text-sm">
                <span className="font-medium">{m.name}</span>
                <span className="text-ink-700">
                  {g.nx} × {g.ny} cells of {g.dLon.toPrecision(3)}° × {g.dLat.toPrecision(3)}°
                </span>
                <span>{m.active ? "active" : "not used"}</span>
                <ElevationToggle id={m.id} active={m.active} />
              </li>
            );
          })}
        </ul>
      </section>
    </div>
  );
}
