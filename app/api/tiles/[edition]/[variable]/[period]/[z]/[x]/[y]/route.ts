import { errors } from "@/lib/errors";
import { route } from "@/lib/http/route";
import { parseLayerKey } from "@/lib/tiles/layers";
import { isValidTile, MAX_ZOOM } from "@/lib/tiles/mercator";
import { findPublicEdition, findSurface, layerScale, renderSurfaceTile, tileEtag } from "@/lib/tiles/service";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** Editions never change: a tile URL names its edition, so the answer can be cached for good. */
const IMMUTABLE = "public, max-age=31536000, immutable";

const INTEGER = /^(0|[1-9]\d{0,5})$/;

/**
 * A 256-pixel web-mercator tile of one surface of a public edition:
 * /api/tiles/{edition}/{layer}/{period}/{z}/{x}/{y}.png, layer = d18O | d2H | dExcess | precipMm,
 * optionally with "-sd" for the uncertainty (1 standard deviation); period 0 = annual, 1–12 = months.
 * "current" in place of the edition redirects (302, not cached) to the newest published edition's
 * address. Open to everyone.
 */
export const GET = route({ auth: "public", anonymous: true }, async ({ req, params }) => {
  const [editionId, layer, periodText, zText, xText, yFile] = ["edition", "variable", "period", "z", "x", "y"].map((k) => String(params[k]));
  const yText = yFile.endsWith(".png") ? yFile.slice(0, -4) : "";
  if (!INTEGER.test(zText) || !INTEGER.test(xText) || !INTEGER.test(yText))
    throw errors.invalid(`A tile address is /api/tiles/{edition}/{layer}/{period}/{z}/{x}/{y}.png with whole numbers z, x and y; got ${zText}/${xText}/${yFile}.`);
  const [z, x, y] = [Number(zText), Number(xText), Number(yText)];
  if (!isValidTile(z, x, y))
    throw errors.invalid(`There is no tile ${z}/${x}/${y}: zoom runs from 0 to ${MAX_ZOOM}, and x and y from 0 to 2^zoom − 1 (${2 ** Math.min(z, 30) - 1} at zoom ${z}).`);
  if (!INTEGER.test(periodText) || Number(periodText) > 12)
    throw errors.invalid(`The period is 0 (annual) or a month 1–12; got “${periodText}”.`);
  const period = Number(periodText);
  const spec = parseLayerKey(layer);
  if (!spec)
    throw errors.notFound(`There is no map layer “${layer}”. Layers: d18O, d2H, dExcess, precipMm, each also with -sd for its uncertainty (e.g. d18O-sd).`);
  const edition = await findPublicEdition(editionId);
  if (!edition)
    throw errors.notFound(
      editionId === "current"
        ? "No edition has been published yet, so there are no tiles."
        : `There is no published edition “${editionId}”. Tile addresses name an edition by its id, e.g. 2026.12.1 (or “current”, which redirects to the newest).`,
    );
  if (editionId === "current") {
    // "current" moves when a new edition is published: send the caller to the immutable address.
    const to = new URL(req.url);
    to.pathname = `/api/tiles/${encodeURIComponent(edition.id)}/${layer}/${period}/${z}/${x}/${y}.png`;
    return new Response(null, { status: 302, headers: { Location: to.pathname + to.search, "Cache-Control": "no-cache" } });
  }
  const surface = await findSurface(edition.id, spec, period);
  const scale = surface ? await layerScale(edition.id, spec, period) : null;
  if (!surface || !scale) throw errors.notFound(`Edition ${edition.id} has no ${spec.variable} surface for period ${period}.`);

  const etag = tileEtag(edition.id, spec.key, period, z, x, y);
  const headers = { "Cache-Control": IMMUTABLE, ETag: etag, "Content-Type": "image/png" };
  const match = req.headers.get("if-none-match");
  if (match && match.split(",").some((t) => t.trim().replace(/^W\//, "") === etag)) return new Response(null, { status: 304, headers });
  const png = await renderSurfaceTile(surface, spec, scale, z, x, y);
  return new Response(new Uint8Array(png), { headers: { ...headers, "Content-Length": String(png.byteLength) } });
});
