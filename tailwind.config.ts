import type { Config } from "tailwindcss";

// Ergodex theme: a calm neutral base, one accent (deep teal), run states from the
// Okabe–Ito colour-blind-safe palette (Okabe & Ito 2008), always paired with a word.
export default {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: "#1c2127", soft: "#48515c", faint: "#7a838e" },
        paper: { DEFAULT: "#fbfbfa", raised: "#ffffff", sunken: "#f2f3f2" },
        line: { DEFAULT: "#e1e4e6", strong: "#c9ced3" },
        accent: { DEFAULT: "#0f6b6b", soft: "#e3f0ef", strong: "#0a4f4f" },
        state: {
          queued: "#999999",
          dispatched: "#56B4E9",
          running: "#0072B2",
          collecting: "#CC79A7",
          done: "#009E73",
          failed: "#D55E00",
          cancelled: "#E69F00",
        },
        danger: { DEFAULT: "#b3361a", soft: "#fbece7" },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      spacing: { gutter: "1.5rem", rail: "15rem" },
      fontSize: { xxs: ["0.6875rem", "1rem"] },
    },
  },
} satisfies Config;
