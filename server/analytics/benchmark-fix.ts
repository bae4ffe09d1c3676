/**
 * First-time fix and repair-order cycle time (DOMAIN.md §3 "Shop KPIs", common practice, no source).
 *
 * First-time fix = complaints fixed in one visit, with no comeback and no return for parts ÷ complaints. A
 * complaint is a qualifying original repair line (the comeback rate's denominator: a failure line, not itself a
 * comeback, whose comeback window has passed); it needed a return for parts when its part was back-ordered or its
 * RO holds a return-for-parts line. The funnel: complaints → without a return for parts → also without a comeback.
 *
 * Cycle time = calendar days from an RO's first opening to its last close; the days waiting for parts are the
 * union of its lines' order → receipt spans, clipped to the RO's own span, so overlapping orders count once.
 */
import { quantile } from "d3-array";
import { share } from "./kpis.js";
import { pct, shareFigure } from "./benchmark-figures.js";
import { funnelStatus, NO_GROUP_RATE } from "./benchmark-funnel.js";
import { daysBetween } from "../../shared/dates.js";
import { MINIMUM_LINES, type FunnelStatus } from "../../shared/schemas/benchmarks.js";
import { medianInterval } from "./benchmark-median-interval.js";
import type { CycleFigure, FixRow, MedianLimits } from "../../shared/schemas/benchmark-details.js";

/** One complaint: whether its part came on a second visit, and whether it came back. */
export interface Complaint {
  returnedForParts: boolean;
  cameBack: boolean;
}

export interface FixFunnel {
  complaints: number;
  noReturn: number;
  fixed: number;
}

/** The first-time-fix funnel of some complaints. */
export function fixFunnel(cs: readonly Complaint[]): FixFunnel {
  const noReturn = cs.filter((c) => !c.returnedForParts);
  return { complaints: cs.length, noReturn: noReturn.length, fixed: noReturn.filter((c) => !c.cameBack).length };
}

/** One RO line's dates. */
export interface CycleLine {
  ro: string;
  opened: string;
  closed: string;
  ordered: string | null;
  received: string | null;
}

export interface RoCycle {
  ro: string;
  days: number;
  waitingDays: number;
}

/** Days covered by the union of [from, to] spans (each clipped to [lo, hi]); a span of one day's order and receipt is 0. */
export function unionDays(spans: readonly (readonly [string, string])[], lo: string, hi: string): number {
  const clipped = spans
    .map(([a, b]) => [a < lo ? lo : a, b > hi ? hi : b] as const)
    .filter(([a, b]) => a < b)
    .sort((x, y) => (x[0] < y[0] ? -1 : 1));
  let total = 0;
  let cur: [string, string] | null = null;
  for (const [a, b] of clipped) {
    if (cur && a <= cur[1]) {
      if (b > cur[1]) cur[1] = b;
    } else {
      if (cur) total += daysBetween(cur[0], cur[1]);
      cur = [a, b];
    }
  }
  if (cur) total += daysBetween(cur[0], cur[1]);
  return total;
}

/** Lines grouped by RO: open to close in days, and the days of it spent waiting for parts. */
export function roCycles(lines: readonly CycleLine[]): RoCycle[] {
  const by = new Map<string, CycleLine[]>();
  for (const l of lines) {
    const g = by.get(l.ro);
    if (g) g.push(l);
    else by.set(l.ro, [l]);
  }
  return [...by].map(([ro, g]) => {
    const open = g.reduce((m, l) => (l.opened < m ? l.opened : m), g[0]!.opened);
    const close = g.reduce((m, l) => (l.closed > m ? l.closed : m), g[0]!.closed);
    const spans = g.filter((l) => l.ordered !== null && l.received !== null).map((l) => [l.ordered!, l.received!] as const);
    return { ro, days: daysBetween(open, close), waitingDays: unionDays(spans, open, close) };
  });
}

const tenth = (x: number | undefined | null) => (x === null || x === undefined ? null : Math.round(x * 10) / 10);

const limits = (values: readonly number[]): MedianLimits => {
  const i = medianInterval(values)?.interval;
  return i ? { from: i.from, to: i.to, coverage: i.coverage } : null;
};

/**
 * Cycle-time figure: median and p90 of open → close days (R type 7 quantiles, d3-array), the median with its
 * distribution-free 95 % interval (Conover §3.2); the share of all cycle days spent waiting for parts (Σ waiting
 * ÷ Σ cycle days); the orders that waited, their median cycle, and the median of their days waiting with its interval.
 */
export function cycleFigure(cs: readonly RoCycle[]): CycleFigure {
  const days = cs.map((c) => c.days).sort((a, b) => a - b);
  const total = days.reduce((s, d) => s + d, 0);
  const waiting = cs.filter((c) => c.waitingDays > 0);
  const waitingTotal = cs.reduce((s, c) => s + c.waitingDays, 0);
  return {
    orders: cs.length,
    median: tenth(quantile(days, 0.5)),
    medianLimits: limits(days),
    p90: tenth(quantile(days, 0.9)),
    waitingShare: total > 0 ? waitingTotal / total : null,
    ordersWaiting: waiting.length,
    medianWaiting: tenth(quantile(waiting.map((c) => c.days), 0.5)),
    waitingDaysMedian: tenth(quantile(waiting.map((c) => c.waitingDays).sort((a, b) => a - b), 0.5)),
    waitingDaysLimits: limits(waiting.map((c) => c.waitingDays)),
  };
}

/** The funnel status of a first-time-fix rate reads the other way round: above the limits is better than the group. */
const FIX_WORDS: Record<FunnelStatus, string> = {
  above_998: "above the 99.8 % limit: clearly more fixed first time than the group",
  above_95: "above the 95 % limit: more fixed first time than the group",
  within: "within the limits: no different from the group",
  below_95: "below the 95 % limit: worth watching",
  below_998: "below the 99.8 % limit: fewer fixed first time than chance explains at this volume",
  not_rated: `fewer than ${MINIMUM_LINES} complaints: not rated`,
};

/** A row of the first-time-fix table: the funnel counts, the rate with its Wilson interval and funnel status, the cycle. */
export function fixRow(key: string, label: string, f: FixFunnel, p0: number | null, cycle: CycleFigure): FixRow {
  const s = share(f.fixed, f.complaints);
  const status = funnelStatus(f.fixed, f.complaints, p0);
  const words = status === "not_rated" ? (f.complaints >= MINIMUM_LINES ? NO_GROUP_RATE : FIX_WORDS[status]) : `${pct(f.fixed / f.complaints)} of ${f.complaints} complaints is ${FIX_WORDS[status]}`;
  return { key, label, funnel: f, firstTimeFix: shareFigure(s, false, "no qualifying complaints", MINIMUM_LINES), status, words, cycle };
}
