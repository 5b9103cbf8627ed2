import type { Metadata } from "next";
import Link from "next/link";
import { MapLoader } from "@/components/map/map-loader";
import { PageHeader } from "@/components/ui/page-header";
import { listPublishedEditions } from "@/lib/editions/queries";
import { parseLayerKey } from "@/lib/tiles/layers";

export const metadata: Metadata = { title: "Map" };
export const dynamic = "force-dynamic";

/** The public map of an edition's surfaces and stations. Open to everyone. */
export default async function MapPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const sp = await searchParams;
  const one = (k: string) => (typeof sp[k] === "string" ? (sp[k] as string) : undefined);
  const editions = await listPublishedEditions();
  const lead = "Interpolated δ18O, δ2H and d-excess of precipitation from the accepted station data, with its uncertainty. Click anywhere for the predicted value and its 95% interval.";
  if (editions.length === 0)
    return (
      <div>
        <PageHeader title="Map" lead={lead} />
        <section className="max-w-prose rounded-md border border-ink-200 bg-white p-5" data-testid="no-edition">
          <h2 className="text-lg font-semibold">No edition has been published yet</h2>
          <p className="mt-2 text-ink-700">
            The map shows the surfaces of a published edition. Once moderators have accepted enough samples and published the first edition, it
            appears here. Meanwhile you can read about <Link className="underline" href="/">what Rainprint does</Link> or{" "}
            <Link className="underline" href="/sign-up">create an account</Link> to contribute samples.
          </p>
        </section>
      </div>
    );
  // Current = newest published; withdrawn ones stay listed for citations.
  const list = [...editions].sort((a, b) => Number(a.status === "withdrawn") - Number(b.status === "withdrawn"));
  const wanted = one("edition");
  const edition = list.find((e) => e.id === wanted) ?? list[0];
  const layer = parseLayerKey(one("layer") ?? "d18O");
  const periodN = Number(one("period") ?? 0);
  const period = Number.isInteger(periodN) && periodN >= 0 && periodN <= 12 ? periodN : 0;
  const variable = layer && layer.variable !== "precipMm" ? layer.variable : "d18O";
  return (
    <div>
      <PageHeader title="Map" lead={lead} />
      <MapLoader
        editions={list.map((e) => ({ id: e.id, isDemo: e.isDemo, publishedAt: e.publishedAt?.toISOString() ?? null, withdrawn: e.status === "withdrawn", withdrawnReason: e.withdrawnReason }))}
        initial={{ edition: edition.id, variable, kind: layer?.kind ?? "value", period }}
      />
    </div>
  );
}
