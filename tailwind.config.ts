import type { Config } from "tailwindcss";

/**
 * Cairn's visual identity, defined once. Stone greys for structure, lichen green for the primary
 * action, and three signal colours kept for the three kinds of stop: amber (futility), teal
 * (efficacy) and berry (safety). Contrast of text colours on their backgrounds is at least 4.5:1.
 */
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        stone: {
          50: "#f7f6f3",
          100: "#eeece6",
          200: "#dcd8cd",
          300: "#c2bcad",
          400: "#9a9384",
          500: "#676052",
          600: "#5e584c",
          700: "#48433a",
          800: "#302d27",
          900: "#1f1d19",
        },
        lichen: { 50: "#eef6ef", 100: "#d5ead8", 500: "#3f7d4f", 600: "#336842", 700: "#285435", 800: "#1d3f27" },
        amber: { 50: "#fdf5e6", 100: "#f9e3b8", 600: "#9a5b06", 700: "#7a4705" },
        tealx: { 50: "#e7f5f6", 100: "#c4e6e9", 600: "#17707a", 700: "#125961" },
        berry: { 50: "#fbeef3", 100: "#f4d0de", 600: "#a02a5a", 700: "#7f1f47" },
      },
      fontFamily: {
        sans: ["var(--font-plex-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-plex-mono)", "ui-monospace", "monospace"],
      },
      fontSize: {
        xs: ["0.75rem", { lineHeight: "1.1rem" }],
        sm: ["0.875rem", { lineHeight: "1.3rem" }],
        base: ["1rem", { lineHeight: "1.55rem" }],
        lg: ["1.125rem", { lineHeight: "1.7rem" }],
        xl: ["1.375rem", { lineHeight: "1.9rem" }],
        "2xl": ["1.75rem", { lineHeight: "2.2rem" }],
      },
      borderRadius: { card: "0.6rem" },
    },
  },
};

export default config;
