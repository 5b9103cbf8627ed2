import type { Config } from "tailwindcss";

// Rainprint's look: deep "ink" blue-greys for text, a cool paper background,
// one accent ("tarn", a mountain-lake teal) and plain signal colours for check
// severities. Data colours (isoscape ramps) live in lib/tiles/ramps.ts, not here.
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}", "./lib/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: {
          50: "#f4f6f8",
          100: "#e6eaef",
          200: "#cbd3dc",
          300: "#a4b1c0",
          400: "#74859a",
          500: "#56677d",
          600: "#435165",
          700: "#354052",
          800: "#242d3b",
          900: "#151b25",
        },
        paper: "#fbfcfd",
        tarn: {
          50: "#eef8f8",
          100: "#d3eeee",
          200: "#a8dcdd",
          300: "#72c2c5",
          400: "#3fa2a8",
          500: "#24858c",
          600: "#1b6a72",
          700: "#18555c",
          800: "#16454b",
          900: "#123a3f",
        },
        severity: {
          note: "#3f6fb5",
          warn: "#9a6200",
          fail: "#b3261e",
          ok: "#2e7d4f",
        },
      },
      fontFamily: {
        sans: ["var(--font-plex-sans)", "var(--font-plex-greek)", "system-ui", "sans-serif"],
        mono: ["var(--font-plex-mono)", "ui-monospace", "monospace"],
      },
      maxWidth: {
        prose: "72ch",
      },
    },
  },
};

export default config;
