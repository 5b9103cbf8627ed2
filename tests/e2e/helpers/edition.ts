import { ensureLookupEdition } from "../../shared/fixture-edition-db";
import { testDb } from "./db";

let cached: Promise<string> | null = null;

/** The edition the lookup tests use (see tests/shared/fixture-edition-db.ts). */
export function lookupEdition(): Promise<string> {
  return (cached ??= ensureLookupEdition(testDb()));
}
