/**
 * The benchmarks' monthly ledger: per shop and month of close, the counts every benchmark figure is computed
 * from (qualifying lines and comebacks, per technician too; labour, part and cold-start sums; the parts-wait
 * histogram; warranty claims). Periods and groups of shops are sums of its cells.
 */
import { windowElapsed, type ComebackSettings, type OriginalLine } from "./comebacks.js";

/** Sums per shop and month of close, as SQL groups them. */
export interface MonthlyTotals {
  shop: string;
  /** month of the line's close, YYYY-MM */
  month: string;
  effLines: number;
  standardHours: number;
  actualHours: number;
  partLines: number;
  backOrdered: number;
  coldStartJobs: number;
  coldStartMeasured: number;
}

/** Part lines that waited `days` from order to receipt, per shop and month of close. */
export interface WaitCount {
  shop: string;
  month: string;
  days: number;
  lines: number;
}

/** Repair claims decided (submitted, or past the deadline) and those submitted on time, per shop and month of close. */
export interface ClaimCount {
  shop: string;
  month: string;
  claims: number;
  onTime: number;
}

/** The SQL sums of MonthlyTotals, added month by month. */
const SUM_KEYS = ["effLines", "standardHours", "actualHours", "partLines", "backOrdered", "coldStartJobs", "coldStartMeasured"] as const;

export interface LedgerCell extends Pick<MonthlyTotals, (typeof SUM_KEYS)[number]> {
  lines: number;
  withComeback: number;
  techs: Map<string, { lines: number; withComeback: number }>;
  /** parts wait in days → part lines */
  waits: Map<number, number>;
  claims: number;
  claimsOnTime: number;
}

/** shop → month → cell */
export type Ledger = Map<string, Map<string, LedgerCell>>;

/** Claim counts by `shop|month`. */
export type ClaimIndex = Map<string, ClaimCount>;

const emptyCell = (): LedgerCell => ({
  lines: 0, withComeback: 0, techs: new Map(), effLines: 0, standardHours: 0, actualHours: 0, partLines: 0, backOrdered: 0,
  coldStartJobs: 0, coldStartMeasured: 0, waits: new Map(), claims: 0, claimsOnTime: 0,
});

function addInto(into: LedgerCell, c: LedgerCell): void {
  into.lines += c.lines;
  into.withComeback += c.withComeback;
  for (const [t, v] of c.techs) {
    const cur = into.techs.get(t) ?? { lines: 0, withComeback: 0 };
    into.techs.set(t, { lines: cur.lines + v.lines, withComeback: cur.withComeback + v.withComeback });
  }
  for (const k of SUM_KEYS) into[k] += c[k];
  for (const [d, n] of c.waits) into.waits.set(d, (into.waits.get(d) ?? 0) + n);
  into.claims += c.claims;
  into.claimsOnTime += c.claimsOnTime;
}

/**
 * The ledger of paired comeback originals (only those whose window has elapsed by `asOf`, in the month they
 * closed), the SQL sums and the parts-wait counts. Claims are not in it: they change between loads.
 */
export function buildLedger(originals: readonly OriginalLine[], totals: readonly MonthlyTotals[], waits: readonly WaitCount[], asOf: string, s: ComebackSettings): Ledger {
  const ledger: Ledger = new Map();
  const cell = (shop: string, month: string): LedgerCell => {
    let byMonth = ledger.get(shop);
    if (!byMonth) ledger.set(shop, (byMonth = new Map()));
    let c = byMonth.get(month);
    if (!c) byMonth.set(month, (c = emptyCell()));
    return c;
  };
  for (const o of originals) {
    if (!windowElapsed(o.line, asOf, s)) continue;
    const c = cell(o.line.shop, o.line.closed!.slice(0, 7));
    const hit = o.comebacks.length > 0 ? 1 : 0;
    c.lines++;
    c.withComeback += hit;
    if (o.line.technician) {
      const t = c.techs.get(o.line.technician) ?? { lines: 0, withComeback: 0 };
      c.techs.set(o.line.technician, { lines: t.lines + 1, withComeback: t.withComeback + hit });
    }
  }
  for (const t of totals) {
    const c = cell(t.shop, t.month);
    for (const k of SUM_KEYS) c[k] += t[k];
  }
  for (const w of waits) {
    const c = cell(w.shop, w.month);
    c.waits.set(w.days, (c.waits.get(w.days) ?? 0) + w.lines);
  }
  return ledger;
}

/** Claim counts of the months that began on or before `countedThrough`, by `shop|month`. */
export const indexClaims = (rows: readonly ClaimCount[], countedThrough: string): ClaimIndex =>
  new Map(rows.filter((r) => `${r.month}-01` <= countedThrough).map((r) => [`${r.shop}|${r.month}`, r]));

/** The sum of the cells of some shops over some months, claims included. */
export function sumCells(ledger: Ledger, shops: readonly string[], months: readonly string[], claims: ClaimIndex): LedgerCell {
  const out = emptyCell();
  for (const shop of shops) {
    const byMonth = ledger.get(shop);
    for (const m of months) {
      const c = byMonth?.get(m);
      if (c) addInto(out, c);
      const cl = claims.get(`${shop}|${m}`);
      if (cl) {
        out.claims += cl.claims;
        out.claimsOnTime += cl.onTime;
      }
    }
  }
  return out;
}
