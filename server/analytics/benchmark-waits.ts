/**
 * The parts-wait distribution (DOMAIN.md §3 "Parts wait", common practice, no source): the share of part lines
 * in each wait band and waiting over 3, 7 and 14 days, by shop and by month of order, and the stretches of months
 * that stand out from the usual month (a back-order winter). Pure: grouped counts in, figures out.
 */
import { partsWait, share } from "./kpis.js";
import { shareFigure } from "./benchmark-figures.js";
import { monthLabel } from "../../shared/dates.js";
import { WAIT_BANDS, WAIT_THRESHOLDS, type WaitDistribution, type WaitMonth, type WaitStretch } from "../../shared/schemas/benchmark-details.js";

/** Part lines grouped as SQL returns them. */
export interface WaitRow {
  shop: string;
  /** month the part was ordered, YYYY-MM */
  orderMonth: string;
  /** month the line closed, YYYY-MM */
  closeMonth: string;
  /** calendar days from order to receipt (≥ 0) */
  days: number;
  backOrdered: boolean;
  component: string;
  engineFamily: string | null;
  lines: number;
}

/** Days → lines of some rows. */
export function histogram(rows: readonly WaitRow[]): Map<number, number> {
  const h = new Map<number, number>();
  for (const r of rows) h.set(r.days, (h.get(r.days) ?? 0) + r.lines);
  return h;
}

const tenth = (x: number | null) => (x === null ? null : Math.round(x * 10) / 10);

/**
 * The distribution of waits: lines per band of WAIT_BANDS (the bands partition 0 days and up, so the shares add
 * up to 1), the share over each of WAIT_THRESHOLDS days with its 95 % Wilson interval, median and p90.
 */
export function waitDistribution(key: string, label: string, h: ReadonlyMap<number, number>): WaitDistribution {
  let n = 0;
  for (const v of h.values()) n += v;
  const inBand = (from: number, to: number | null) => [...h].filter(([d]) => d >= from && (to === null || d <= to)).reduce((s, [, v]) => s + v, 0);
  const over = (t: number) => [...h].filter(([d]) => d > t).reduce((s, [, v]) => s + v, 0);
  const w = partsWait(h);
  return {
    key,
    label,
    n,
    bands: WAIT_BANDS.map((b) => {
      const lines = inBand(b.from, b.to);
      return { key: b.key, label: b.label, lines, share: n > 0 ? lines / n : 0 };
    }),
    over: WAIT_THRESHOLDS.map((t) => ({ days: t, figure: shareFigure(share(over(t), n), false, "no part received") })),
    median: tenth(w.median),
    p90: tenth(w.p90),
  };
}

/** Months in which fewer part lines were ordered are not judged. */
export const MONTH_MINIMUM = 30;
/** The least share over 14 days that can stand out (common practice, no source). */
export const FLOOR_OVER14 = 0.015;

/**
 * Per month of order: lines, the shares over 7 and 14 days and back-ordered, and the median wait. A month stands
 * out when it has MONTH_MINIMUM lines or more and the 95 % Wilson lower limit of its share over 14 days is above
 * both twice the usual month's share (the median of the monthly shares, so the stretch itself does not raise the
 * bar) and FLOOR_OVER14, so one stray long wait in a month of none does not make a stretch.
 */
export function waitMonths(rows: readonly WaitRow[], months: readonly string[]): { months: WaitMonth[]; baseline: number | null } {
  const by = new Map<string, WaitRow[]>();
  for (const r of rows) {
    const g = by.get(r.orderMonth);
    if (g) g.push(r);
    else by.set(r.orderMonth, [r]);
  }
  const sum = (g: readonly WaitRow[], f: (r: WaitRow) => boolean) => g.filter(f).reduce((s, r) => s + r.lines, 0);
  const base = months.map((month) => {
    const g = by.get(month) ?? [];
    const n = sum(g, () => true);
    const o14 = sum(g, (r) => r.days > 14);
    return {
      month,
      n,
      o14,
      over7: n ? sum(g, (r) => r.days > 7) / n : null,
      over14: n ? o14 / n : null,
      backOrdered: n ? sum(g, (r) => r.backOrdered) / n : null,
      median: tenth(partsWait(histogram(g)).median),
    };
  });
  const judged = base.filter((m) => m.n >= MONTH_MINIMUM).map((m) => m.over14!).sort((a, b) => a - b);
  const baseline = judged.length ? judged[Math.floor((judged.length - 1) / 2)]! : null;
  return {
    baseline,
    months: base.map(({ o14, ...m }) => ({
      ...m,
      standout: baseline !== null && m.n >= MONTH_MINIMUM && (share(o14, m.n).estimate?.lower ?? 0) > Math.max(2 * baseline, FLOOR_OVER14),
    })),
  };
}

const pct = (x: number) => `${Math.round(100 * x)} %`;

/** Runs of consecutive standout months, each with its figures and the parts that waited longest, in words. */
export function waitStretches(months: readonly WaitMonth[], rows: readonly WaitRow[], baseline: number | null): WaitStretch[] {
  const runs: WaitMonth[][] = [];
  let run: WaitMonth[] = [];
  for (const m of months) {
    if (m.standout) run.push(m);
    else if (run.length) (runs.push(run), (run = []));
  }
  if (run.length) runs.push(run);
  return runs.map((r) => {
    const inRun = new Set(r.map((m) => m.month));
    const g = rows.filter((x) => inRun.has(x.orderMonth));
    const lines = g.reduce((s, x) => s + x.lines, 0);
    const over14 = g.filter((x) => x.days > 14).reduce((s, x) => s + x.lines, 0);
    const backOrdered = g.filter((x) => x.backOrdered).reduce((s, x) => s + x.lines, 0);
    const byPart = new Map<string, WaitRow[]>();
    for (const x of g) {
      const k = `${x.component}|${x.engineFamily ?? ""}`;
      const p = byPart.get(k);
      if (p) p.push(x);
      else byPart.set(k, [x]);
    }
    const parts = [...byPart.values()]
      .map((p) => ({
        component: p[0]!.component,
        engineFamily: p[0]!.engineFamily,
        lines: p.reduce((s, x) => s + x.lines, 0),
        over14: p.filter((x) => x.days > 14).reduce((s, x) => s + x.lines, 0),
        median: tenth(partsWait(histogram(p)).median),
      }))
      .filter((p) => p.over14 > 0)
      .sort((a, b) => b.over14 - a.over14 || a.component.localeCompare(b.component))
      .slice(0, 3);
    const from = r[0]!.month;
    const to = r[r.length - 1]!.month;
    const label = from === to ? monthLabel(from) : `${monthLabel(from)} to ${monthLabel(to)}`;
    const top = parts[0];
    const words =
      `Parts ordered ${label}: ${pct(over14 / lines)} of ${lines} part lines waited over 14 days (usual month ${baseline === null ? "–" : pct(baseline)}), ` +
      `${pct(backOrdered / lines)} back-ordered` +
      (top ? `; most of the long waits were ${top.component}${top.engineFamily ? ` for ${top.engineFamily}` : ""} (${top.over14} of ${top.lines} lines over 14 days, median ${top.median} days).` : ".");
    return { from, to, label, lines, over14, median: tenth(partsWait(histogram(g)).median), backOrdered, parts, words };
  });
}
