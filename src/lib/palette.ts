/**
 * Ironledger's palette. Chart colours are a colour-blind-safe set of our own (distinct in lightness
 * as well as hue); the UI colours are slate ink on warm paper with a teal accent.
 */
export const palette = {
  ink: "#1d2430",
  slate: "#2f3b4c",
  paper: "#f4f2ec",
  card: "#ffffff",
  line: "#d6d2c6",
  muted: "#5f6b7a",
  accent: "#1f6f78",
  accentSoft: "#d7ebec",
  ochre: "#d39b2a",
  alert: "#a8322d",
  ok: "#2e7d4f",
  series: ["#1f6f78", "#d39b2a", "#6b4c9a", "#a8322d", "#3f8fd2", "#7a8b3a", "#8c5a3c", "#5f6b7a"],
} as const;
export type Palette = typeof palette;
