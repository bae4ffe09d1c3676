/**
 * Counts of repair lines and pages in words: exact ones in full ("32,890 repair lines"), estimates rounded
 * to two significant figures and said as such ("about 1.2 million repair lines", "about 6,600").
 */
function rounded(n: number): string {
  if (n >= 1e6) return `${Number((n / 1e6).toPrecision(2)).toLocaleString("en-US")} million`;
  return Number(n.toPrecision(2)).toLocaleString("en-US");
}

export const countInWords = (n: number, isEstimate: boolean) => (isEstimate ? `about ${rounded(n)}` : n.toLocaleString("en-US"));

export const linesInWords = (n: number, isEstimate: boolean) =>
  `${countInWords(n, isEstimate)} repair ${n === 1 && !isEstimate ? "line" : "lines"}`;
