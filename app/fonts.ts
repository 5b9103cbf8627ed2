import localFont from "next/font/local";

// IBM Plex (SIL Open Font License 1.1, see fonts/OFL-IBM-Plex.txt), shipped as files.
export const plexSans = localFont({
  src: [
    { path: "../fonts/ibm-plex-sans-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/ibm-plex-sans-latin-400-italic.woff2", weight: "400", style: "italic" },
    { path: "../fonts/ibm-plex-sans-latin-500-normal.woff2", weight: "500", style: "normal" },
    { path: "../fonts/ibm-plex-sans-latin-600-normal.woff2", weight: "600", style: "normal" },
    { path: "../fonts/ibm-plex-sans-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-plex-sans",
  display: "swap",
});

// Greek glyphs (δ) come from the Greek subset; the browser falls back to it per glyph.
export const plexGreek = localFont({
  src: [
    { path: "../fonts/ibm-plex-sans-greek-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/ibm-plex-sans-greek-500-normal.woff2", weight: "500", style: "normal" },
    { path: "../fonts/ibm-plex-sans-greek-600-normal.woff2", weight: "600", style: "normal" },
    { path: "../fonts/ibm-plex-sans-greek-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-plex-greek",
  display: "swap",
});

export const plexMono = localFont({
  src: [
    { path: "../fonts/ibm-plex-mono-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/ibm-plex-mono-latin-500-normal.woff2", weight: "500", style: "normal" },
  ],
  variable: "--font-plex-mono",
  display: "swap",
});
