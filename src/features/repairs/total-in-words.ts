import type { Format } from "@shared/format";

/**
 * Counts of repair lines and pages in words: exact ones in full ("32,890 repair lines"), estimates rounded
 * to two significant figures and said as such ("about 1.2 million repair lines", "about 6,600"); figures in
 * the reader's locale.
 */
function rounded(n: number, fmt: Format): string {
  if (n >= 1e6) return `${fmt.quantity("plain", Number((n / 1e6).toPrecision(2)))} million`;
  return fmt.count(Number(n.toPrecision(2)));
}

export const countInWords = (n: number, isEstimate: boolean, fmt: Format) => (isEstimate ? `about ${rounded(n, fmt)}` : fmt.count(n));

export const linesInWords = (n: number, isEstimate: boolean, fmt: Format) =>
  `${countInWords(n, isEstimate, fmt)} repair ${n === 1 && !isEstimate ? "line" : "lines"}`;
