// The licences Rainprint's downloads carry, stated once so every file, page and
// e-mail says the same thing. Pure data: safe in client code.
//
// Contributed station data and the editions built from it are released under
// Creative Commons Attribution 4.0 International: anyone may reuse them, also
// commercially, provided they credit the contributors (station operators and
// the people who submitted the samples) and Rainprint. Contributors agree to
// this licence when they submit data.

export const DATA_LICENCE = {
  /** SPDX identifier. */
  id: "CC-BY-4.0",
  name: "Creative Commons Attribution 4.0 International (CC BY 4.0)",
  shortName: "CC BY 4.0",
  url: "https://creativecommons.org/licenses/by/4.0/",
} as const;

/** How to credit a download (ASCII only: it also goes into GeoTIFF tags). */
export const CREDIT_LINE =
  "credit the station operators and contributors named in this file, and Rainprint";

/** The label every piece of invented demo data carries. */
export const SYNTHETIC_LABEL = "synthetic demo data";
