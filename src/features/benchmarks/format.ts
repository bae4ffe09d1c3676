import type { Format } from "@shared/format";
import type { ShareFigure } from "@shared/schemas/benchmarks";
import type { MedianLimits } from "@shared/schemas/benchmark-details";

const NBSP = "\u00a0";

/** The benchmarks' words for figures, in the reader's locale through the shared Format (one rule per kind). */
export interface BenchmarkFormat {
  /** a fraction as a percentage with 1 decimal */
  pct(x: number | null | undefined): string;
  /** an integer with group separators */
  count(n: number | null | undefined): string;
  /** days to at most 2 decimals, with the unit */
  days(x: number | null | undefined): string;
  /** hours to at most 2 decimals, with the unit */
  hours(x: number | null | undefined): string;
  /** "13.7% (11.3%–16.6%)" for a share with its interval, or the share's note in words */
  share(f: ShareFigure): string;
  /** "95 %: 11.3%–16.6% · 91 of 663", the line under a share */
  interval(f: ShareFigure): string | undefined;
  /** the share alone, or its note */
  value(f: ShareFigure): string;
  /** a median's distribution-free interval in days, "95 %: 2–9 d", or why there is none */
  medianLimits(l: MedianLimits, n: number): string;
}

export function benchmarkFormat(f: Format): BenchmarkFormat {
  const pct = (x: number | null | undefined) => f.percent(x);
  const plain = (x: number | null | undefined, unit: string) => (x === null || x === undefined || !Number.isFinite(x) ? "–" : `${f.quantity("plain", x)}${NBSP}${unit}`);
  const range = (lo: number, hi: number) => `${pct(lo)}–${pct(hi)}`;
  return {
    pct,
    count: (n) => f.count(n),
    days: (x) => plain(x, "d"),
    hours: (x) => plain(x, "h"),
    share: (s) => (s.value === null ? (s.note ?? "–") : s.lower === null || s.upper === null ? pct(s.value) : `${pct(s.value)} (${range(s.lower, s.upper)})`),
    interval: (s) => {
      const parts: string[] = [];
      if (s.value !== null && s.lower !== null && s.upper !== null) parts.push(`95${NBSP}%: ${range(s.lower, s.upper)}`);
      if (s.successes !== null && s.n !== null) parts.push(`${f.count(s.successes)} of ${f.count(s.n)}`);
      return parts.length ? parts.join(" · ") : undefined;
    },
    value: (s) => (s.value === null ? (s.note ?? "–") : pct(s.value)),
    medianLimits: (l, n) => (l === null ? (n > 0 ? "too few for an interval" : "–") : `95${NBSP}%: ${f.quantity("plain", l.from)}–${plain(l.to, "d")}`),
  };
}
