import { getDb } from "../index";
import { editions } from "../schema";
import { defaultBuildParameters } from "@/lib/editions/build/compute";
import { nextEditionId, publishEdition, runEditionBuild, audit } from "@/lib/editions/build/pipeline";
import type { SeedProfile } from "./index";

/** Grid of the seeded edition per profile: 0.25° global land for `npm start`, 2° for the end-to-end tests. */
export const DEMO_EDITION_RESOLUTION: Record<SeedProfile, number> = { full: 0.25, test: 2 };

/**
 * Build and publish the demo edition from the seeded accepted samples (synthetic demo data), unless
 * an edition already exists. Runs the same pipeline as the worker, in this process.
 */
export async function seedDemoEdition(opts: { profile: SeedProfile; log?: (m: string) => void }): Promise<string | null> {
  const db = getDb();
  const any = await db.select({ id: editions.id }).from(editions).limit(1).get();
  if (any) return null;
  const log = opts.log ?? (() => {});
  const params = defaultBuildParameters({ grid: { resolutionDeg: DEMO_EDITION_RESOLUTION[opts.profile] } });
  const editionId = await nextEditionId();
  await db.insert(editions).values({ id: editionId, status: "building", parameters: params, isDemo: true });
  await audit(db, { actorId: null, editionId, action: "build-start", after: { status: "building", parameters: params, seeded: true } });
  const t0 = performance.now();
  let last = "";
  await runEditionBuild(editionId, {
    progress: ({ stage }) => {
      if (stage !== last) log(`edition ${editionId}: ${stage}`);
      last = stage;
    },
  });
  await publishEdition(editionId, null);
  log(`edition ${editionId} published (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
  return editionId;
}
