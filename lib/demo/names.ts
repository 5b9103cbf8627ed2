// Invented names for the synthetic demo data: organisations, laboratories, people and
// place-like station names. All fictional; e-mail addresses use the reserved .example
// domain, which never receives mail.

import type { DemoLaboratory, DemoOrganization } from "./types";
import type { Rng } from "./prng";

export const ORGANIZATIONS: DemoOrganization[] = [
  { key: "tallowfen", name: "Tallowfen Hydrology Collective", slug: "tallowfen", kind: "volunteer network" },
  { key: "northmarch", name: "Northmarch University Water Laboratory", slug: "northmarch", kind: "university" },
  { key: "corrie-bay", name: "Corrie Bay Rain Watchers", slug: "corrie-bay", kind: "volunteer network" },
  { key: "prairie-lantern", name: "Prairie Lantern Field Stations", slug: "prairie-lantern", kind: "university" },
  { key: "sierra-albar", name: "Sierra Albar Catchment Trust", slug: "sierra-albar", kind: "trust" },
  { key: "rift-highland", name: "Rift Highland Water Partnership", slug: "rift-highland", kind: "agency" },
  { key: "savanna-edge", name: "Savanna Edge Monitoring Group", slug: "savanna-edge", kind: "volunteer network" },
  { key: "dryland-springs", name: "Dryland Springs Survey", slug: "dryland-springs", kind: "agency" },
  { key: "steppe-taiga", name: "Steppe and Taiga Sampling Circle", slug: "steppe-taiga", kind: "volunteer network" },
  { key: "monsoon-margin", name: "Monsoon Margin Isotope Project", slug: "monsoon-margin", kind: "university" },
  { key: "southern-divide", name: "Southern Divide Rain Gauge Club", slug: "southern-divide", kind: "volunteer network" },
  { key: "coral-rim", name: "Coral Rim Island Observers", slug: "coral-rim", kind: "trust" },
  { key: "greywacke", name: "Greywacke Alpine Institute", slug: "greywacke", kind: "university" },
];

export const LABORATORIES: DemoLaboratory[] = [
  {
    key: "lab-tallowfen",
    name: "Tallowfen Stable Isotope Facility",
    method: "laser spectroscopy",
    d18OSdPermil: [0.06, 0.12],
    d2HSdPermil: [0.5, 1.0],
    referenceWaters: "VSMOW2, SLAP2; in-house waters TF-1 and TF-3 calibrated against them",
  },
  {
    key: "lab-northmarch",
    name: "Northmarch Isotope Ratio Laboratory",
    method: "IRMS",
    d18OSdPermil: [0.05, 0.08],
    d2HSdPermil: [0.5, 0.9],
    referenceWaters: "VSMOW2, SLAP2, GISP",
  },
  {
    key: "lab-rift",
    name: "Rift Valley Water Tracer Laboratory",
    method: "laser spectroscopy",
    d18OSdPermil: [0.12, 0.2],
    d2HSdPermil: [1.2, 2.0],
    referenceWaters: "VSMOW2, SLAP2; in-house waters RV-A and RV-B calibrated against them",
  },
  {
    key: "lab-pacific",
    name: "Pacific Rim Environmental Isotopes",
    method: "IRMS",
    d18OSdPermil: [0.06, 0.1],
    d2HSdPermil: [0.7, 1.2],
    referenceWaters: "VSMOW2, SLAP2, GISP",
  },
  {
    key: "lab-andean",
    name: "Andean Tracer Laboratory",
    method: "laser spectroscopy",
    d18OSdPermil: [0.1, 0.18],
    d2HSdPermil: [1.0, 1.8],
    referenceWaters: "VSMOW2, SLAP2; in-house waters AT-2 and AT-5 calibrated against them",
  },
];

/** Which laboratory an organisation sends its samples to. */
export const ORGANIZATION_LAB: Record<string, string> = {
  tallowfen: "lab-tallowfen",
  northmarch: "lab-northmarch",
  "corrie-bay": "lab-northmarch",
  "prairie-lantern": "lab-pacific",
  "sierra-albar": "lab-andean",
  "rift-highland": "lab-rift",
  "savanna-edge": "lab-rift",
  "dryland-springs": "lab-tallowfen",
  "steppe-taiga": "lab-northmarch",
  "monsoon-margin": "lab-pacific",
  "southern-divide": "lab-pacific",
  "coral-rim": "lab-pacific",
  greywacke: "lab-andean",
};

const FIRST_NAMES = [
  "Aster", "Bexley", "Corin", "Dalia", "Emrys", "Fenna", "Galen", "Hollis", "Ilka", "Jory", "Kaia", "Lior",
  "Maren", "Nilo", "Odile", "Pim", "Quilla", "Rhea", "Soren", "Tamsin", "Ulla", "Vian", "Wren", "Yusra",
  "Zeno", "Anouk", "Bastian", "Calla", "Dario", "Elin", "Farid", "Greer", "Hanne", "Idris", "Juno", "Kofi",
];
const SURNAMES = [
  "Ashgrove", "Bellwether", "Coldbrook", "Dunmere", "Everhart", "Fallowby", "Greyling", "Hartwell", "Ivesdale",
  "Juniperlow", "Kettleby", "Larchmont", "Mossgiel", "Nettlefold", "Oakhurst", "Pennyroyal", "Quarrington",
  "Rookwood", "Sallowmere", "Thistlewood", "Underhill", "Vantreeck", "Wexcombe", "Yarrowby", "Zellinger",
];

/** n distinct invented person names. */
export function personNames(rng: Rng, n: number): string[] {
  const seen = new Set<string>();
  const out: string[] = [];
  while (out.length < n) {
    const name = `${rng.pick(FIRST_NAMES)} ${rng.pick(SURNAMES)}`;
    if (seen.has(name)) continue;
    seen.add(name);
    out.push(name);
  }
  return out;
}

/** e-mail for an invented person at an invented organisation (.example never receives mail). */
export function personEmail(name: string, orgSlug: string): string {
  const local = name
    .toLowerCase()
    .replace(/[^a-z ]/g, "")
    .trim()
    .replace(/\s+/g, ".");
  return `${local}@${orgSlug}.example`;
}

const NAME_HEADS = [
  "Vell", "Quor", "Thist", "Ombr", "Skel", "Yarv", "Drem", "Brin", "Fask", "Ilv", "Marr", "Nesk", "Pold",
  "Rask", "Sorn", "Tavv", "Ust", "Wend", "Zorr", "Cael", "Hobb", "Lune", "Grell", "Aske",
];
const NAME_TAILS = [
  "amere", "oway", "ilde", "enholt", "arrow", "esk", "ivale", "ucross", "ethorn", "ommon", "arrach", "ibeck",
  "olme", "ingle", "astow", "urrow",
];
const NAME_FEATURES = [
  "Flats", "Hollow", "Upland", "Crossing", "Bench", "Terrace", "Basin", "Spur", "Plain", "Heights", "Saddle",
  "Fold", "Shelf", "Reach",
];

/** A place-like invented station name, unique within `taken`. */
export function stationName(rng: Rng, taken: Set<string>): string {
  for (;;) {
    const name = `${rng.pick(NAME_HEADS)}${rng.pick(NAME_TAILS)} ${rng.pick(NAME_FEATURES)}`;
    if (!taken.has(name)) {
      taken.add(name);
      return name;
    }
  }
}
