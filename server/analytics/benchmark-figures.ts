/**
 * Benchmark figures from ledger sums: shares with their Wilson interval, labour efficiency, parts wait and claims
 * on time, each with the note that says why it is missing. For an anonymised peer the counts and intervals are
 * withheld and rates are rounded to 0.1 %.
 */
import { labourEfficiency, partsWait, share, type Share } from "./kpis.js";
import type { LedgerCell } from "./benchmark-ledger.js";
import type { EfficiencyFigure, ShareFigure, ShopBenchmark, WaitFigure } from "../../shared/schemas/benchmarks.js";

export const round3 = (x: number | null): number | null => (x === null ? null : Math.round(x * 1000) / 1000);
/** A proportion as a percentage in words, to 0.1 %. */
export const pct = (x: number): string => `${(100 * x).toFixed(1)} %`;

/** A share as a figure; below `minimum` lines it is not rated. */
export function shareFigure(s: Share, peer: boolean, emptyNote: string, minimum = 0): ShareFigure {
  if (s.n === 0 || s.estimate === null) return { value: null, lower: null, upper: null, successes: peer ? null : s.successes, n: peer ? null : s.n, note: emptyNote };
  if (s.n < minimum) {
    return { value: null, lower: null, upper: null, successes: peer ? null : s.successes, n: peer ? null : s.n, note: `fewer than ${minimum} lines: not rated` };
  }
  if (peer) return { value: round3(s.estimate.proportion), lower: null, upper: null, successes: null, n: null, note: null };
  return { value: s.estimate.proportion, lower: s.estimate.lower, upper: s.estimate.upper, successes: s.successes, n: s.n, note: null };
}

function efficiencyFigure(c: LedgerCell, peer: boolean): EfficiencyFigure {
  const e = labourEfficiency(c.effLines, c.standardHours, c.actualHours);
  if (e.ratio === null) return { value: null, standardHours: null, actualHours: null, lines: peer ? null : e.lines, note: "no lines with a standard time" };
  if (peer) return { value: round3(e.ratio), standardHours: null, actualHours: null, lines: null, note: null };
  return { value: e.ratio, standardHours: e.standardHours, actualHours: e.actualHours, lines: e.lines, note: null };
}

/** Median and 90th percentile of the parts wait, to 0.1 day. */
function waitFigure(c: LedgerCell, peer: boolean): WaitFigure {
  const w = partsWait(c.waits);
  if (w.n === 0) return { median: null, p90: null, n: peer ? null : 0, note: "no part received" };
  const tenth = (x: number | null) => (x === null ? null : Math.round(x * 10) / 10);
  return { median: tenth(w.median), p90: tenth(w.p90), n: peer ? null : w.n, note: null };
}

/** Claims submitted on time; "no data yet" while the group has no decided claim at all. */
function claimsFigure(c: LedgerCell, peer: boolean, anyClaims: boolean): ShareFigure {
  if (!anyClaims) return { value: null, lower: null, upper: null, successes: null, n: null, note: "no data yet: no warranty claims have been recorded" };
  return shareFigure(share(c.claimsOnTime, c.claims), peer, "no claims for lines closed in this period");
}

/** The figures other than the comeback rate, in the order the responses give them. */
export function kpiFigures(c: LedgerCell, peer: boolean, anyClaims: boolean): Pick<ShopBenchmark, "efficiency" | "partsWait" | "backOrder" | "coldStartMeasured" | "warrantyOnTime"> {
  return {
    efficiency: efficiencyFigure(c, peer),
    partsWait: waitFigure(c, peer),
    backOrder: shareFigure(share(c.backOrdered, c.partLines), peer, "no part lines"),
    coldStartMeasured: shareFigure(share(c.coldStartMeasured, c.coldStartJobs), peer, "no cold-start jobs"),
    warrantyOnTime: claimsFigure(c, peer, anyClaims),
  };
}
