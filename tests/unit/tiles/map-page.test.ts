// The map page's server side (app/map/page.tsx), rendered to HTML with react-dom/server:
// with no published edition it says so plainly instead of drawing an empty map; with one it
// hands the explorer the edition list and a selection parsed from the address.
import { createElement, isValidElement, type ReactElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions } from "@/db/schema";
import { freshDb } from "../helpers/db";

async function renderPage(search: Record<string, string> = {}): Promise<ReactElement> {
  const { default: MapPage } = await import("@/app/map/page");
  return (await MapPage({ searchParams: Promise.resolve(search) })) as ReactElement;
}

/** The props given to the client-side explorer (found in the element tree without rendering it). */
function loaderProps(el: ReactElement): { editions: { id: string; withdrawn: boolean }[]; initial: Record<string, unknown> } | null {
  const stack: unknown[] = [el];
  while (stack.length) {
    const node = stack.pop();
    if (Array.isArray(node)) stack.push(...node);
    else if (isValidElement(node)) {
      const props = node.props as Record<string, unknown>;
      if (typeof node.type === "function" && node.type.name === "MapLoader") return props as never;
      stack.push(props.children);
    }
  }
  return null;
}

beforeAll(async () => {
  await freshDb();
});

describe("the map page", () => {
  it("says that no edition has been published yet, with no map", async () => {
    const html = renderToStaticMarkup(createElement("div", null, await renderPage()));
    expect(html).toContain("No edition has been published yet");
    expect(html).toContain('data-testid="no-edition"');
    expect(html).not.toContain("Loading the map");
  });

  it("passes the published editions (current first, withdrawn last) and the selection from the address", async () => {
    await getDb().insert(editions).values([
      { id: "2026.11.1", status: "withdrawn", isDemo: true, publishedAt: new Date("2026-11-02"), withdrawnAt: new Date("2026-11-20") },
      { id: "2026.12.1", status: "published", isDemo: true, publishedAt: new Date("2026-12-01") },
      { id: "2026.12.2", status: "building", isDemo: true },
    ]);
    const props = loaderProps(await renderPage({ layer: "dExcess-sd", period: "7" }))!;
    expect(props.editions.map((e) => [e.id, e.withdrawn])).toEqual([
      ["2026.12.1", false],
      ["2026.11.1", true],
    ]);
    expect(props.initial).toEqual({ edition: "2026.12.1", variable: "dExcess", kind: "sd", period: 7 });
    const odd = loaderProps(await renderPage({ edition: "2026.11.1", layer: "nonsense", period: "99" }))!;
    expect(odd.initial).toEqual({ edition: "2026.11.1", variable: "d18O", kind: "value", period: 0 });
  });
});
