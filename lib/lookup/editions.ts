import "server-only";
import { listPublishedEditions } from "@/lib/editions/queries";

/** Published (and withdrawn, still citable) editions for the lookup forms' edition choice. */
export async function editionChoices(): Promise<{ id: string; label: string }[]> {
  const list = await listPublishedEditions();
  return list.map((e) => ({
    id: e.id,
    label: `${e.id}${e.publishedAt ? ` (published ${e.publishedAt.toISOString().slice(0, 10)})` : ""}${e.status === "withdrawn" ? ", withdrawn" : ""}`,
  }));
}
