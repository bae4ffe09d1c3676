/**
 * What lies behind the benchmark figures: the lines of one shop's KPI (with their CSV), the parts-wait
 * distribution and its winter, and first-time fix with repair-order cycle time. Every figure is computed for the
 * same period and comeback window as the shop table; a caller limited to some shops sees only those shops' lines
 * and rows (and the group's sums).
 */
import { stringify } from "csv-stringify/sync";
import type { Db } from "../../db/database.js";
import { claimLines, cycleLines, kpiLines, returnForPartsLines, waitRows, type ClaimLineRow, type KpiLineRow } from "../../db/queries/benchmark-details.js";
import { partsWait } from "../../analytics/kpis.js";
import { windowElapsed, type ComebackSettings } from "../../analytics/comebacks.js";
import { histogram, waitDistribution, waitMonths, waitStretches } from "../../analytics/benchmark-waits.js";
import { cycleFigure, fixFunnel, fixRow, roCycles, type CycleLine } from "../../analytics/benchmark-fix.js";
import { funnelCurve } from "../../analytics/benchmark-funnel.js";
import { GROUP_HIDDEN } from "../../analytics/peer-groups.js";
import type { View } from "./view.js";
import { csvCell } from "../../../shared/csv-cell.js";
import { monthEnd, monthsBetween, addMonthsToMonth, todayIso } from "../../../shared/dates.js";
import {
  lineKpiLabels, type BenchmarkLines, type BenchmarkLinesQuery, type FixCycle, type KpiLine, type LineTotals, type Waits,
} from "../../../shared/schemas/benchmark-details.js";

/** The last close date the period counts: its end, or the last date whose comeback window has passed. */
export const countedTo = (v: View): string => (v.resolved.period.to < v.resolved.period.countedThrough ? v.resolved.period.to : v.resolved.period.countedThrough);

const tenth = (x: number | null) => (x === null ? null : Math.round(x * 10) / 10);

const blank: KpiLine = {
  roNumber: "", lineNo: null, opened: null, closed: null, technician: null, component: null, laborOp: null, standardHours: null, actualHours: null,
  efficiency: null, partNumber: null, ordered: null, received: null, waitDays: null, backOrdered: null, readings: null, claimNumber: null,
  deadline: null, filed: null, onTime: null, counted: null,
};

function asLine(kpi: BenchmarkLinesQuery["kpi"], r: KpiLineRow): KpiLine {
  const base = { ...blank, roNumber: r.roNumber, lineNo: r.lineNo, opened: r.opened, closed: r.closed, technician: r.technician, component: r.component };
  if (kpi === "efficiency") {
    return { ...base, laborOp: r.laborOp, standardHours: r.standardHours, actualHours: r.actualHours, efficiency: r.actualHours ? r.standardHours! / r.actualHours : null };
  }
  if (kpi === "coldStart") return { ...base, readings: r.readings, counted: r.readings > 0 };
  return { ...base, partNumber: r.partNumber, ordered: r.ordered, received: r.received, waitDays: r.waitDays, backOrdered: r.backOrdered, counted: kpi === "backOrder" ? r.backOrdered : null };
}

const claimLine = (c: ClaimLineRow): KpiLine => ({ ...blank, roNumber: c.roNumber ?? "", closed: c.closed, claimNumber: c.claimNumber, deadline: c.deadline, filed: c.filed, onTime: c.onTime, counted: c.onTime });

/** The order each KPI lists its lines in: the worst first. */
function worstFirst(kpi: BenchmarkLinesQuery["kpi"], lines: KpiLine[]): KpiLine[] {
  const by = {
    efficiency: (a: KpiLine, b: KpiLine) => (a.efficiency ?? Infinity) - (b.efficiency ?? Infinity),
    partsWait: (a: KpiLine, b: KpiLine) => (b.waitDays ?? -1) - (a.waitDays ?? -1),
    backOrder: (a: KpiLine, b: KpiLine) => Number(b.backOrdered) - Number(a.backOrdered) || (b.waitDays ?? -1) - (a.waitDays ?? -1),
    coldStart: (a: KpiLine, b: KpiLine) => Number(a.counted) - Number(b.counted) || ((b.closed ?? "") < (a.closed ?? "") ? -1 : 1),
    claims: (a: KpiLine, b: KpiLine) => Number(a.onTime) - Number(b.onTime) || ((a.deadline ?? "") < (b.deadline ?? "") ? -1 : 1),
  }[kpi];
  return [...lines].sort(by);
}

/** The KPI recomputed from its lines, by the shop table's formula. */
export function lineTotals(kpi: BenchmarkLinesQuery["kpi"], lines: readonly KpiLine[]): LineTotals {
  const t: LineTotals = { lines: lines.length, standardHours: null, actualHours: null, median: null, p90: null, counted: null, value: null };
  if (kpi === "efficiency") {
    const std = lines.reduce((s, l) => s + l.standardHours!, 0);
    const act = lines.reduce((s, l) => s + l.actualHours!, 0);
    return { ...t, standardHours: std, actualHours: act, value: act > 0 ? std / act : null };
  }
  if (kpi === "partsWait") {
    const w = partsWait(histogram(lines.map((l) => ({ shop: "", orderMonth: "", closeMonth: "", days: l.waitDays!, backOrdered: false, component: "", engineFamily: null, lines: 1 }))));
    return { ...t, median: tenth(w.median), p90: tenth(w.p90) };
  }
  const counted = lines.filter((l) => l.counted).length;
  return { ...t, counted, value: lines.length ? counted / lines.length : null };
}

const RULES: Record<BenchmarkLinesQuery["kpi"], string> = {
  efficiency: "Lines with a standard time and a booked actual time, lowest efficiency (standard ÷ actual) first.",
  partsWait: "Part lines with an order and a receipt date, longest wait first.",
  backOrder: "Lines with a part ordered, back-ordered ones first, longest wait first.",
  coldStart: "Failure lines on a cold-start aid, those without any reading first.",
  claims: "Repair claims submitted or past their deadline, by month of the RO close, late ones first.",
};

export async function benchmarkLines(db: Db, v: View, q: BenchmarkLinesQuery, shop: { code: string; name: string }, scope: Parameters<typeof kpiLines>[1]): Promise<BenchmarkLines> {
  const p = v.resolved.period;
  let lines: KpiLine[];
  if (q.kpi === "claims") {
    const months = v.resolved.months.filter((m) => `${m}-01` <= p.countedThrough);
    lines = months.length ? (await claimLines(db, scope, shop.code, `${months[0]}-01`, monthEnd(months[months.length - 1]!), todayIso())).map(claimLine) : [];
  } else {
    lines = (await kpiLines(db, scope, q.kpi, shop.code, p.from, countedTo(v), q.technician)).map((r) => asLine(q.kpi, r));
  }
  lines = worstFirst(q.kpi, lines);
  return {
    kpi: q.kpi,
    period: p,
    settings: { days: q.days, hours: q.hours },
    shop,
    technician: q.kpi === "claims" ? null : (q.technician ?? null),
    rule: `${lineKpiLabels[q.kpi]} of ${shop.code} ${shop.name}, ${p.label}: ${RULES[q.kpi]}${q.kpi === "claims" && q.technician ? " Claims are not kept by technician: every claim of the shop is listed." : ""}`,
    totals: lineTotals(q.kpi, lines),
    lines,
  };
}

/** CSV columns per KPI: raw numbers, the unit in the header. */
const CSV_COLUMNS: Record<BenchmarkLinesQuery["kpi"], readonly (readonly [header: string, get: (l: KpiLine) => unknown])[]> = {
  efficiency: [["labor_op", (l) => l.laborOp], ["standard_hours_h", (l) => l.standardHours], ["actual_hours_h", (l) => l.actualHours], ["efficiency_ratio", (l) => l.efficiency]],
  partsWait: [["part_number", (l) => l.partNumber], ["ordered_date", (l) => l.ordered], ["received_date", (l) => l.received], ["wait_days_d", (l) => l.waitDays], ["back_ordered", (l) => l.backOrdered]],
  backOrder: [["part_number", (l) => l.partNumber], ["ordered_date", (l) => l.ordered], ["received_date", (l) => l.received], ["wait_days_d", (l) => l.waitDays], ["back_ordered", (l) => l.backOrdered]],
  coldStart: [["readings_count", (l) => l.readings], ["measured", (l) => l.counted]],
  claims: [["claim_number", (l) => l.claimNumber], ["deadline_date", (l) => l.deadline], ["filed_date", (l) => l.filed], ["on_time", (l) => l.onTime]],
};

/** The lines as CSV (RFC 4180 via csv-stringify), one row per line. */
export function benchmarkLinesCsv(b: BenchmarkLines): string {
  const common = [
    ["shop", () => b.shop.code], ["ro_number", (l: KpiLine) => l.roNumber], ["line_no", (l: KpiLine) => l.lineNo], ["opened_date", (l: KpiLine) => l.opened],
    ["closed_date", (l: KpiLine) => l.closed], ["technician", (l: KpiLine) => l.technician], ["component", (l: KpiLine) => l.component],
  ] as const;
  const cols = [...common, ...CSV_COLUMNS[b.kpi]] as readonly (readonly [string, (l: KpiLine) => unknown])[];
  const cell = (x: unknown) => (typeof x === "boolean" ? (x ? "yes" : "no") : csvCell(x));
  return stringify([cols.map((c) => c[0]), ...b.lines.map((l) => cols.map((c) => cell(c[1](l))))], { record_delimiter: "\r\n" });
}

export const WAITS_METHOD =
  "Wait = calendar days from part order to receipt on part lines. Bands 0–3, 4–7, 8–14 and over 14 days share out every line; " +
  "the shares over 3, 7 and 14 days carry 95 % Wilson intervals. Shops and the group are over the period's closed lines; the months are by month of order over all the data. " +
  "A month stands out when it has 30 part lines or more and the lower 95 % limit of its share over 14 days is above twice the usual month's (the median month) and above 1.5 %.";

export async function waits(db: Db, v: View): Promise<Waits> {
  const p = v.resolved.period;
  const rows = await waitRows(db, p.countedThrough);
  const inPeriod = new Set(v.resolved.months);
  const periodRows = rows.filter((r) => inPeriod.has(r.closeMonth) && r.closeMonth <= p.countedThrough.slice(0, 7));
  const named = v.world.shops.filter((s) => s.inScope);
  const orderMonths = rows.map((r) => r.orderMonth).sort();
  const first = orderMonths[0] ?? p.lastMonth;
  const months = Array.from({ length: Math.max(1, monthsBetween(first, p.lastMonth) + 1) }, (_, i) => addMonthsToMonth(first, i));
  const trendRows = rows.filter((r) => r.orderMonth <= p.lastMonth);
  const m = waitMonths(v.groupShown ? trendRows : [], v.groupShown ? months : []);
  return {
    period: p,
    group: v.groupShown ? waitDistribution("group", "Group", histogram(periodRows)) : null,
    groupHidden: v.groupShown ? null : GROUP_HIDDEN,
    shops: named.map((s) => waitDistribution(s.code, `${s.code} ${s.name}`, histogram(periodRows.filter((r) => r.shop === s.code)))),
    months: m.months,
    baselineOver14: m.baseline,
    stretches: v.groupShown ? waitStretches(m.months, trendRows, m.baseline) : [],
    method: WAITS_METHOD,
  };
}

export const FIX_METHOD =
  "First-time fix = complaints fixed in one visit, with no comeback and no return for parts ÷ complaints. A complaint is a qualifying repair line " +
  "(the comeback rate's: a failure line, not itself a comeback, whose comeback window has passed); it needed a return for parts when its part was " +
  "back-ordered or its RO holds a return-for-parts line. 95 % Wilson interval; funnel limits around the group rate (exact binomial, Spiegelhalter 2005); " +
  "not rated below 30 complaints. Cycle time = calendar days from an RO's opening to its last line's close, median and 90th percentile; each median carries a " +
  "distribution-free 95 % interval from the order statistics (ranks k and n − k + 1, binomial coverage; Conover 1999, §3.2; none below 6 ROs). Waiting for parts = " +
  "the days between a part's order and receipt within the RO (overlaps counted once), as a share of all cycle days. ROs by the close of their last line in the period; " +
  "an RO counts for the technician of its first line.";

export async function fixCycle(db: Db, v: View, scopeArg: Parameters<typeof cycleLines>[1], settings: ComebackSettings): Promise<FixCycle> {
  const p = v.resolved.period;
  const s = v.world;
  const months = new Set(v.resolved.months);
  const [returned, cycleRows] = await Promise.all([returnForPartsLines(db), cycleLines(db, scopeArg, p.from, countedTo(v))]);
  const complaints = s.originals
    .filter((o) => months.has(o.line.closed!.slice(0, 7)) && o.line.closed! <= p.countedThrough && windowElapsed(o.line, s.asOf, settings))
    .map((o) => ({ shop: o.line.shop, technician: o.line.technician, returnedForParts: returned.has(o.line.id), cameBack: o.comebacks.length > 0 }));
  const groupFunnel = fixFunnel(complaints);
  const p0 = v.groupShown && groupFunnel.complaints > 0 ? groupFunnel.fixed / groupFunnel.complaints : null;
  const cyclesOf = (rows: readonly CycleLine[]) => cycleFigure(roCycles(rows));
  const shops = s.shops
    .filter((x) => x.inScope)
    .map((x) => {
      const mine = complaints.filter((c) => c.shop === x.code);
      const myRows = cycleRows.filter((r) => r.shop === x.code);
      const techs = [...new Set([...mine.map((c) => c.technician), ...myRows.map((r) => r.technician)].filter((t): t is string => t !== null))].sort();
      return {
        ...fixRow(x.code, `${x.code} ${x.name}`, fixFunnel(mine), p0, cyclesOf(myRows)),
        technicians: techs.map((t) =>
          fixRow(t, `${t} ${s.techNames.get(t) ?? ""}`.trim(), fixFunnel(mine.filter((c) => c.technician === t)), p0, cyclesOf(myRows.filter((r) => r.technician === t))),
        ),
      };
    });
  return {
    period: p,
    settings,
    group: v.groupShown ? fixRow("group", "Group", groupFunnel, null, cyclesOf(cycleRows)) : null,
    groupHidden: v.groupShown ? null : GROUP_HIDDEN,
    groupRate: p0,
    limits: funnelCurve(p0, shops.map((s) => ({ x: s.funnel.complaints, band: null }))),
    shops,
    method: FIX_METHOD,
  };
}
