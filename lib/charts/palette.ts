/**
 * Cairn's chart colours, one list for the screens (components/charts/plot.tsx) and the PDF packets
 * (lib/packets): a boundary, an arm or a curve has the same colour wherever it is drawn. Each keeps
 * at least 3:1 against white (WCAG 2.2, 1.4.11 non-text contrast; palette.test.ts).
 */
export const CAIRN_COLOURS = {
  futility: "#9a5b06",
  efficacy: "#17707a",
  safety: "#a02a5a",
  observed: "#1f1d19",
  posterior: "#3f7d4f",
  prior: "#9a9384",
  control: "#5e584c",
} as const;
