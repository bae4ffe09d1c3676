import type { ShareFigure } from "@shared/schemas/benchmarks";

export const pct = (x: number | null | undefined, digits = 1): string => (x === null || x === undefined ? "–" : `${(100 * x).toFixed(digits)} %`);

/** "13.7 % (11.3–16.6 %)" for a share with its interval, or the share's note in words. */
export function shareText(f: ShareFigure): string {
  if (f.value === null) return f.note ?? "–";
  if (f.lower === null || f.upper === null) return pct(f.value);
  return `${pct(f.value)} (${(100 * f.lower).toFixed(1)}–${pct(f.upper)})`;
}


export const days = (x: number | null): string => (x === null ? "–" : `${x.toLocaleString("en-US", { maximumFractionDigits: 1 })} d`);

/** The interval and the counts of a share, for the line under the figure: "95 %: 11.3–16.6 % · 91 of 663". */
export function intervalText(f: ShareFigure): string | undefined {
  const parts: string[] = [];
  if (f.value !== null && f.lower !== null && f.upper !== null) parts.push(`95 %: ${(100 * f.lower).toFixed(1)}–${pct(f.upper)}`);
  if (f.successes !== null && f.n !== null) parts.push(`${f.successes} of ${f.n}`);
  return parts.length ? parts.join(" · ") : undefined;
}

/** The figure alone: the share, or its note in words. */
export const valueText = (f: ShareFigure): string => (f.value === null ? (f.note ?? "–") : pct(f.value));
