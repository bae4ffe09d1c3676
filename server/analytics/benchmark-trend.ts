/** The comeback trend: per month, the rate of the 12 months of closed lines ending with it, and the month's own rate. */
import { share } from "./kpis.js";
import { shareFigure } from "./benchmark-figures.js";
import { sumCells, type ClaimIndex, type Ledger } from "./benchmark-ledger.js";
import { monthsEnding } from "./benchmark-periods.js";
import { MINIMUM_LINES, type TrendPoint } from "../../shared/schemas/benchmarks.js";

/** The window of the rolling rate, in months. */
const ROLLING = 12;

/**
 * The trend of some shops over the `count` months ending with `last`, oldest first. A peer's month is given as
 * its rounded rolling rate only.
 */
export function trendPoints(ledger: Ledger, claims: ClaimIndex, codes: readonly string[], last: string, count: number, peer: boolean): TrendPoint[] {
  const span = monthsEnding(last, count + ROLLING - 1);
  return span.slice(ROLLING - 1).map((month, i) => {
    const own = sumCells(ledger, codes, [month], claims);
    const rolling = sumCells(ledger, codes, span.slice(i, i + ROLLING), claims);
    return {
      month,
      monthRate: !peer && own.lines >= MINIMUM_LINES ? own.withComeback / own.lines : null,
      monthLines: peer ? null : own.lines,
      rolling: shareFigure(share(rolling.withComeback, rolling.lines), peer, "no qualifying repair lines", MINIMUM_LINES),
    };
  });
}
