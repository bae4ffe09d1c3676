import { Router } from "express";
import { createHmac, randomBytes } from "node:crypto";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { forbidden, notFound } from "../errors.js";
import { ResultCache } from "../services/result-cache.js";
import { dataVersion } from "../db/queries/data-version.js";
import {
  benchmarkShops,
  comebackLines,
  dataSpan,
  lineDetails,
  monthlyTotals,
  partsWaitCounts,
  technicianNames,
  warrantyClaimCounts,
  type ClaimCount,
  type LineDetail,
  type MonthlyTotals,
  type ShopEntry,
} from "../db/queries/benchmarks.js";
import { addDays, pairComebacks, windowElapsed, type ComebackSettings, type OriginalLine } from "../analytics/comebacks.js";
import { labourEfficiency, partsWait, share, type Share } from "../analytics/kpis.js";
import { funnelLimits } from "../analytics/proportion.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import {
  MINIMUM_LINES,
  benchmarkQuerySchema,
  comebackPairsQuerySchema,
  trendQuerySchema,
  type BenchmarkQuery,
  type ComebackFigure,
  type ComebackPairs,
  type EfficiencyFigure,
  type Formulas,
  type Funnel,
  type FunnelPoint,
  type FunnelStatus,
  type PairLine,
  type Period,
  type ShareFigure,
  type ShopBenchmark,
  type ShopBenchmarks,
  type TechnicianRow,
  type Trend,
  type TrendPoint,
  type Visit,
  type WaitFigure,
} from "../../shared/schemas/benchmarks.js";

export const BENCHMARK_ROLES = ["director", "analyst", "manager", "admin"] as const;

// ── months and periods ────────────────────────────────────────────────────────────────────────────────────

const MONTH_NAMES = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"];

export function monthAdd(month: string, k: number): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  const t = y * 12 + (m - 1) + k;
  return `${Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, "0")}`;
}
const monthIndex = (month: string): number => Number(month.slice(0, 4)) * 12 + Number(month.slice(5)) - 1;
const monthEnd = (month: string): string => addDays(`${monthAdd(month, 1)}-01`, -1);
const monthLabel = (month: string): string => `${MONTH_NAMES[Number(month.slice(5)) - 1]} ${month.slice(0, 4)}`;
const monthsEnding = (last: string, count: number): string[] => Array.from({ length: count }, (_, i) => monthAdd(last, i - count + 1));

interface ResolvedPeriod {
  period: Period;
  months: string[];
}

/**
 * The months of a period and its words. `at` defaults to the latest period whose comeback window has fully
 * elapsed: lines closed after asOf − N days are still waiting and are not counted.
 */
export function resolvePeriod(kind: Period["kind"], at: string | undefined, asOf: string, firstMonth: string, days: number): ResolvedPeriod {
  const countedThrough = addDays(asOf, -days);
  const lastMonth = monthEnd(countedThrough.slice(0, 7)) === countedThrough ? countedThrough.slice(0, 7) : monthAdd(countedThrough.slice(0, 7), -1);
  const lastMonthNo = Number(lastMonth.slice(5));
  const fallback = kind === "quarter" ? monthAdd(lastMonth, -(lastMonthNo % 3)) : kind === "year" ? (lastMonthNo === 12 ? lastMonth : `${Number(lastMonth.slice(0, 4)) - 1}-12`) : lastMonth;
  const m = at ?? fallback;
  const year = m.slice(0, 4);
  let months: string[];
  let key: string;
  let label: string;
  if (kind === "month") {
    months = [m];
    key = m;
    label = monthLabel(m);
  } else if (kind === "quarter") {
    const q = Math.floor((Number(m.slice(5)) - 1) / 3) + 1;
    months = monthsEnding(`${year}-${String(q * 3).padStart(2, "0")}`, 3);
    key = `${year}-Q${q}`;
    label = `Q${q} ${year}`;
  } else if (kind === "year") {
    months = monthsEnding(`${year}-12`, 12);
    key = year;
    label = year;
  } else if (kind === "rolling12") {
    months = monthsEnding(m, 12);
    key = `12m-${m}`;
    label = `12 months to ${monthLabel(m)}`;
  } else {
    const count = Math.max(1, monthIndex(m) - monthIndex(firstMonth) + 1);
    months = monthsEnding(m, count);
    key = `all-${m}`;
    label = `${monthLabel(months[0]!)} to ${monthLabel(m)}`;
  }
  const to = monthEnd(months[months.length - 1]!);
  return {
    months,
    period: { kind, key, label, from: `${months[0]}-01`, to, asOf, countedThrough, complete: to <= countedThrough, firstMonth, lastMonth },
  };
}

// ── anonymised peers ──────────────────────────────────────────────────────────────────────────────────────

/**
 * Letters for the shops a caller may not name, shuffled by a keyed hash of the period, the caller's own shops
 * and the shop: stable for one period and caller, unrelated between periods, and not reproducible without the
 * server's secret, so neither the order nor the letter gives a shop away.
 */
export function peerLetters(codes: readonly string[], periodKey: string, viewerKey: string, secret: string): Map<string, string> {
  const ranked = codes
    .map((c) => [c, createHmac("sha256", secret).update(`${periodKey}|${viewerKey}|${c}`).digest("hex")] as const)
    .sort((a, b) => (a[1] < b[1] ? -1 : 1));
  const letter = (i: number): string => (i < 26 ? String.fromCharCode(65 + i) : letter(Math.floor(i / 26) - 1) + String.fromCharCode(65 + (i % 26)));
  return new Map(ranked.map(([c], i) => [c, letter(i)]));
}

const BAND_EDGES = [30, 100, 300, 1000, 3000, 10000, 30000, 100000];

/** A coarse volume band (about ×3 steps), shown for a peer instead of its exact line count. */
export interface Band {
  label: string;
  mid: number;
  from: number;
  to: number;
}

const bandIndex = (n: number): number => {
  let i = -1;
  while (i + 1 < BAND_EDGES.length && n >= BAND_EDGES[i + 1]!) i++;
  return i;
};
const bandEdge = (i: number): number => (i < 0 ? 0 : BAND_EDGES[i]!);
const bandTop = (i: number): number => (i + 1 < BAND_EDGES.length ? BAND_EDGES[i + 1]! - 1 : BAND_EDGES[BAND_EDGES.length - 1]!);

/**
 * Volume bands for a set of peers such that no band holds a single peer (when there are two or more): a peer
 * alone in its band would be recognisable as the group's busiest or quietest shop, so its band is merged with
 * the nearest band that holds other peers.
 */
export function peerBands(lines: readonly number[]): Band[] {
  let groups = [...new Set(lines.map(bandIndex))].sort((a, b) => a - b).map((i) => ({ lo: i, hi: i }));
  const members = (g: { lo: number; hi: number }) => lines.filter((n) => bandIndex(n) >= g.lo && bandIndex(n) <= g.hi).length;
  for (let lonely = groups.findIndex((g) => members(g) === 1); lonely >= 0 && groups.length > 1; lonely = groups.findIndex((g) => members(g) === 1)) {
    const g = groups[lonely]!;
    const prev = groups[lonely - 1];
    const next = groups[lonely + 1];
    const intoPrev = next === undefined || (prev !== undefined && g.lo - prev.hi <= next.lo - g.hi);
    const other = intoPrev ? prev! : next!;
    const merged = { lo: Math.min(g.lo, other.lo), hi: Math.max(g.hi, other.hi) };
    groups = groups.filter((x) => x !== g && x !== other).concat(merged).sort((a, b) => a.lo - b.lo);
  }
  return lines.map((n) => {
    const i = bandIndex(n);
    const g = groups.find((x) => i >= x.lo && i <= x.hi)!;
    const from = bandEdge(g.lo);
    const to = bandTop(g.hi);
    const label = from === 0 ? `under ${(to + 1).toLocaleString("en-US")} lines` : g.hi === BAND_EDGES.length - 1 ? `${from.toLocaleString("en-US")} lines or more` : `${from.toLocaleString("en-US")}–${to.toLocaleString("en-US")} lines`;
    return { label, mid: (from + to + 1) / 2, from, to };
  });
}

const round3 = (x: number | null): number | null => (x === null ? null : Math.round(x * 1000) / 1000);
const pct = (x: number): string => `${(100 * x).toFixed(1)} %`;

// ── the monthly ledger ────────────────────────────────────────────────────────────────────────────────────

/** The SQL sums of monthlyTotals, added month by month. */
const SUM_KEYS = ["effLines", "standardHours", "actualHours", "partLines", "backOrdered", "coldStartJobs", "coldStartMeasured"] as const;

interface Cell extends Pick<MonthlyTotals, (typeof SUM_KEYS)[number]> {
  lines: number;
  withComeback: number;
  techs: Map<string, { lines: number; withComeback: number }>;
  waits: Map<number, number>;
  claims: number;
  claimsOnTime: number;
}

const emptyCell = (): Cell => ({
  lines: 0, withComeback: 0, techs: new Map(), effLines: 0, standardHours: 0, actualHours: 0, partLines: 0, backOrdered: 0,
  coldStartJobs: 0, coldStartMeasured: 0, waits: new Map(), claims: 0, claimsOnTime: 0,
});

function addInto(into: Cell, c: Cell): void {
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

interface World {
  asOf: string;
  firstMonth: string;
  countedThrough: string;
  shops: ShopEntry[];
  originals: OriginalLine[];
  /** shop → month → cell (claims are added per request) */
  ledger: Map<string, Map<string, Cell>>;
  techNames: Map<string, string>;
}

async function buildWorld(db: Db, scope: ShopScope, s: ComebackSettings): Promise<World> {
  const span = await dataSpan(db);
  const asOf = span.asOf ?? new Date().toISOString().slice(0, 10);
  const countedThrough = addDays(asOf, -s.days);
  const [shops, lines, totals, waits, techNames] = await Promise.all([
    benchmarkShops(db, scope),
    comebackLines(db, scope),
    monthlyTotals(db, countedThrough),
    partsWaitCounts(db, countedThrough),
    technicianNames(db, scope),
  ]);
  const originals = pairComebacks(lines, s);
  const ledger = new Map<string, Map<string, Cell>>();
  const cell = (shop: string, month: string): Cell => {
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
  return { asOf, firstMonth: span.firstMonth ?? asOf.slice(0, 7), countedThrough, shops, originals, ledger, techNames };
}

function sumCells(world: World, shops: readonly string[], months: readonly string[], claims: ClaimIndex): Cell {
  const out = emptyCell();
  for (const shop of shops) {
    const byMonth = world.ledger.get(shop);
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

type ClaimIndex = Map<string, ClaimCount>;
const indexClaims = (rows: ClaimCount[]): ClaimIndex => new Map(rows.map((r) => [`${r.shop}|${r.month}`, r]));

// ── figures ───────────────────────────────────────────────────────────────────────────────────────────────

function shareFigure(s: Share, peer: boolean, emptyNote: string, minimum = 0): ShareFigure {
  if (s.n === 0 || s.estimate === null) return { value: null, lower: null, upper: null, successes: peer ? null : s.successes, n: peer ? null : s.n, note: emptyNote };
  if (s.n < minimum) {
    return { value: null, lower: null, upper: null, successes: peer ? null : s.successes, n: peer ? null : s.n, note: `fewer than ${minimum} lines: not rated` };
  }
  if (peer) return { value: round3(s.estimate.proportion), lower: null, upper: null, successes: null, n: null, note: null };
  return { value: s.estimate.proportion, lower: s.estimate.lower, upper: s.estimate.upper, successes: s.successes, n: s.n, note: null };
}

function efficiencyFigure(c: Cell, peer: boolean): EfficiencyFigure {
  const e = labourEfficiency(c.effLines, c.standardHours, c.actualHours);
  if (e.ratio === null) return { value: null, standardHours: null, actualHours: null, lines: peer ? null : e.lines, note: "no lines with a standard time" };
  if (peer) return { value: round3(e.ratio), standardHours: null, actualHours: null, lines: null, note: null };
  return { value: e.ratio, standardHours: e.standardHours, actualHours: e.actualHours, lines: e.lines, note: null };
}

function waitFigure(c: Cell, peer: boolean): WaitFigure {
  const w = partsWait(c.waits);
  if (w.n === 0) return { median: null, p90: null, n: peer ? null : 0, note: "no part received" };
  const tenth = (x: number | null) => (x === null ? null : Math.round(x * 10) / 10);
  return { median: tenth(w.median), p90: tenth(w.p90), n: peer ? null : w.n, note: null };
}

function claimsFigure(c: Cell, peer: boolean, anyClaims: boolean): ShareFigure {
  if (!anyClaims) return { value: null, lower: null, upper: null, successes: null, n: null, note: "no data yet: no warranty claims have been recorded" };
  return shareFigure(share(c.claimsOnTime, c.claims), peer, "no claims for lines closed in this period");
}

function funnelStatus(x: number, n: number, p0: number | null): FunnelStatus {
  if (n < MINIMUM_LINES || p0 === null || !(p0 > 0 && p0 < 1)) return "not_rated";
  const l = funnelLimits(p0, n);
  const r = x / n;
  if (r > l.exact998.upper) return "above_998";
  if (r > l.exact95.upper) return "above_95";
  if (r < l.exact998.lower) return "below_998";
  if (r < l.exact95.lower) return "below_95";
  return "within";
}

const STATUS_WORDS: Record<FunnelStatus, string> = {
  above_998: "above the 99.8 % limit: more comebacks than chance explains at this volume",
  above_95: "above the 95 % limit: worth watching",
  within: "within the limits: no different from the group",
  below_95: "below the 95 % limit: fewer comebacks than the group",
  below_998: "below the 99.8 % limit: clearly fewer comebacks than the group",
  not_rated: `fewer than ${MINIMUM_LINES} lines: not rated`,
};

function comebackFigure(c: Cell, p0: number | null, peerBand: Band | null): ComebackFigure {
  const peer = peerBand !== null;
  const s = share(c.withComeback, c.lines);
  const base = shareFigure(s, peer, "no qualifying repair lines", MINIMUM_LINES);
  const status = funnelStatus(c.withComeback, c.lines, p0);
  let words = STATUS_WORDS[status];
  if (status !== "not_rated" && p0 !== null) {
    const l = funnelLimits(p0, c.lines);
    const limit = status === "above_998" || status === "below_998" ? l.exact998 : l.exact95;
    const edge = status.startsWith("above") ? limit.upper : limit.lower;
    words = peer
      ? `${pct(c.withComeback / c.lines)} is ${STATUS_WORDS[status]} (${peerBand.label})`
      : status === "within"
        ? `${pct(c.withComeback / c.lines)} of ${c.lines} lines is ${STATUS_WORDS[status]} (95 % limits ${pct(l.exact95.lower)}–${pct(l.exact95.upper)})`
        : `${pct(c.withComeback / c.lines)} of ${c.lines} lines is ${STATUS_WORDS[status]} (limit ${pct(edge)})`;
  }
  const aboveGroup = c.lines >= MINIMUM_LINES && p0 !== null && (s.estimate?.lower ?? 0) > p0;
  return { ...base, funnel: status, words, aboveGroup };
}

// ── the router ────────────────────────────────────────────────────────────────────────────────────────────

const scopeKey = (scope: ShopScope): string => (scope.kind === "all" ? "*" : [...scope.shops].sort().join(","));

interface View {
  world: World;
  resolved: ResolvedPeriod;
  claims: ClaimIndex;
  anyClaims: boolean;
  groupCell: Cell;
  p0: number | null;
  /** volume band per shop code: exact-count bands for named shops, merged so no peer stands alone for peers */
  bands: Map<string, Band>;
  /** label and key per shop code, for this caller and period */
  names: Map<string, { key: string; label: string; peer: boolean; shop: ShopEntry }>;
  groupWide: boolean;
}

/**
 * Benchmarks of comebacks, labour, parts and claims per shop and period, with a funnel, a monthly trend and the
 * comeback pairs behind a figure. A caller whose scope is a shop list sees those shops by name and every other
 * shop as a lettered peer, without codes, towns, counts or intervals; the pairs only of their own shops.
 */
export function benchmarkRoutes(db: Db, peerSecret?: string): Router {
  const router = Router();
  // Without a configured secret the letters are stable for the life of the process.
  const secret = peerSecret ?? process.env.BENCHMARK_PEER_SECRET ?? randomBytes(32).toString("hex");
  const cache = new ResultCache<World>(20);
  router.use(allow(...BENCHMARK_ROLES));

  async function view(scope: ShopScope, q: BenchmarkQuery): Promise<View> {
    const settings = { days: q.days, hours: q.hours };
    const world = await cache.get(`${scopeKey(scope)}|${q.days}|${q.hours}`, await dataVersion(db), () => buildWorld(db, scope, settings));
    const resolved = resolvePeriod(q.period, q.at, world.asOf, world.firstMonth, q.days);
    const claimRows = await warrantyClaimCounts(db, new Date().toISOString().slice(0, 10));
    const claims = indexClaims(claimRows.filter((r) => `${r.month}-01` <= world.countedThrough));
    const allCodes = world.shops.map((s) => s.code);
    const groupCell = sumCells(world, allCodes, resolved.months, claims);
    const p0 = groupCell.lines > 0 ? groupCell.withComeback / groupCell.lines : null;
    const groupWide = scope.kind === "all";
    const letters = peerLetters(world.shops.filter((s) => !s.inScope).map((s) => s.code), resolved.period.key, scopeKey(scope), secret);
    const names: View["names"] = new Map();
    for (const s of world.shops) {
      const l = letters.get(s.code);
      names.set(s.code, l === undefined ? { key: s.code, label: `${s.code} ${s.name}`, peer: false, shop: s } : { key: `peer-${l}`, label: `Peer ${l}`, peer: true, shop: s });
    }
    const linesOf = (code: string) => sumCells(world, [code], resolved.months, claims).lines;
    const peerCodes = world.shops.filter((s) => !s.inScope).map((s) => s.code);
    const merged = peerBands(peerCodes.map(linesOf));
    const bands = new Map<string, Band>(world.shops.filter((s) => s.inScope).map((s) => [s.code, peerBands([linesOf(s.code)])[0]!]));
    peerCodes.forEach((code, i) => bands.set(code, merged[i]!));
    return { world, resolved, claims, anyClaims: claimRows.length > 0, groupCell, p0, bands, names, groupWide };
  }

  /** Shops in the order a caller sees them: named shops by code, then peers by letter. */
  const ordered = (v: View) =>
    [...v.names.values()].sort((a, b) => (a.peer !== b.peer ? (a.peer ? 1 : -1) : a.key < b.key ? -1 : 1));

  router.get("/shops", async (req, res) => {
    const scope = requireScope(req);
    const q = benchmarkQuerySchema.parse(req.query);
    const v = await view(scope, q);
    const period = v.resolved.period;
    const rows: ShopBenchmark[] = ordered(v).map((n) => {
      const c = sumCells(v.world, [n.shop.code], v.resolved.months, v.claims);
      const technicians: TechnicianRow[] | null = n.peer
        ? null
        : [...c.techs]
            .sort((a, b) => (a[0] < b[0] ? -1 : 1))
            .map(([techId, t]) => {
              const s = share(t.withComeback, t.lines);
              return {
                techId,
                name: v.world.techNames.get(techId) ?? techId,
                comeback: shareFigure(s, false, "no qualifying repair lines", MINIMUM_LINES),
                aboveGroup: t.lines >= MINIMUM_LINES && v.p0 !== null && (s.estimate?.lower ?? 0) > v.p0,
              };
            });
      return {
        key: n.key,
        label: n.label,
        peer: n.peer,
        shopCode: n.peer ? null : n.shop.code,
        name: n.peer ? null : n.shop.name,
        lines: n.peer ? null : c.lines,
        volumeBand: v.bands.get(n.shop.code)!.label,
        comeback: comebackFigure(c, v.p0, n.peer ? v.bands.get(n.shop.code)! : null),
        efficiency: efficiencyFigure(c, n.peer),
        partsWait: waitFigure(c, n.peer),
        backOrder: shareFigure(share(c.backOrdered, c.partLines), n.peer, "no part lines"),
        coldStartMeasured: shareFigure(share(c.coldStartMeasured, c.coldStartJobs), n.peer, "no cold-start jobs"),
        warrantyOnTime: claimsFigure(c, n.peer, v.anyClaims),
        technicians,
        drillDown: !n.peer,
      };
    });
    const g = v.groupCell;
    const body: ShopBenchmarks = {
      period,
      settings: { days: q.days, hours: q.hours },
      viewer: { groupWide: v.groupWide, ownShops: scope.kind === "all" ? [] : [...scope.shops] },
      formulas: formulas(q, period, !v.groupWide),
      group: {
        lines: g.lines,
        comeback: shareFigure(share(g.withComeback, g.lines), false, "no qualifying repair lines"),
        efficiency: efficiencyFigure(g, false),
        partsWait: waitFigure(g, false),
        backOrder: shareFigure(share(g.backOrdered, g.partLines), false, "no part lines"),
        coldStartMeasured: shareFigure(share(g.coldStartMeasured, g.coldStartJobs), false, "no cold-start jobs"),
        warrantyOnTime: claimsFigure(g, false, v.anyClaims),
      },
      shops: rows,
      visits: visits(rows, v.groupWide),
    };
    res.json(body);
  });

  router.get("/funnel", async (req, res) => {
    const q = benchmarkQuerySchema.parse(req.query);
    const v = await view(requireScope(req), q);
    const points: FunnelPoint[] = [];
    const notRated: string[] = [];
    for (const n of ordered(v)) {
      const c = sumCells(v.world, [n.shop.code], v.resolved.months, v.claims);
      if (c.lines < MINIMUM_LINES || v.p0 === null) {
        notRated.push(n.label);
        continue;
      }
      const band = v.bands.get(n.shop.code)!;
      const fig = comebackFigure(c, v.p0, n.peer ? band : null);
      points.push({
        key: n.key,
        label: n.label,
        peer: n.peer,
        lines: n.peer ? null : c.lines,
        volumeBand: band.label,
        x: n.peer ? band.mid : c.lines,
        band: n.peer ? { from: band.from, to: band.to } : null,
        rate: n.peer ? round3(c.withComeback / c.lines)! : c.withComeback / c.lines,
        status: fig.funnel,
        words: fig.words,
      });
    }
    const maxX = Math.max(MINIMUM_LINES * 2, ...points.map((p) => p.band?.to ?? p.x)) * 1.1;
    const limits: Funnel["limits"] = [];
    if (v.p0 !== null && v.p0 > 0 && v.p0 < 1) {
      const steps = 60;
      for (let i = 0; i <= steps; i++) {
        const n = Math.round(MINIMUM_LINES + ((maxX - MINIMUM_LINES) * i) / steps);
        const l = funnelLimits(v.p0, n);
        limits.push({ n, lower95: l.exact95.lower, upper95: l.exact95.upper, lower998: l.exact998.lower, upper998: l.exact998.upper });
      }
    }
    const body: Funnel = {
      period: v.resolved.period,
      settings: { days: q.days, hours: q.hours },
      groupRate: v.p0,
      groupLines: v.groupCell.lines,
      limits,
      points,
      notRated,
      method: FUNNEL_METHOD,
    };
    res.json(body);
  });

  router.get("/trend", async (req, res) => {
    const q = trendQuerySchema.parse(req.query);
    const v = await view(requireScope(req), q);
    const last = v.resolved.months[v.resolved.months.length - 1]!;
    const months = monthsEnding(last, q.months);
    const point = (codes: string[], month: string, peer: boolean): TrendPoint => {
      const own = sumCells(v.world, codes, [month], v.claims);
      const rolling = sumCells(v.world, codes, monthsEnding(month, 12), v.claims);
      return {
        month,
        monthRate: !peer && own.lines >= MINIMUM_LINES ? own.withComeback / own.lines : null,
        monthLines: peer ? null : own.lines,
        rolling: shareFigure(share(rolling.withComeback, rolling.lines), peer, "no qualifying repair lines", MINIMUM_LINES),
      };
    };
    const allCodes = v.world.shops.map((s) => s.code);
    const body: Trend = {
      period: v.resolved.period,
      settings: { days: q.days, hours: q.hours },
      months,
      group: months.map((m) => point(allCodes, m, false)),
      series: ordered(v).map((n) => ({ key: n.key, label: n.label, peer: n.peer, points: months.map((m) => point([n.shop.code], m, n.peer)) })),
      method:
        "Each point is the comeback rate of the 12 months of closed lines ending with that month (a single month has too few lines per shop to tell a bad month from a trend), with its 95 % Wilson interval; the month's own rate is given where it has 30 lines or more.",
    };
    res.json(body);
  });

  router.get("/comebacks", async (req, res) => {
    const scope = requireScope(req);
    const q = comebackPairsQuerySchema.parse(req.query);
    const v = await view(scope, q);
    const entry = v.world.shops.find((s) => s.code === q.shop);
    if (!entry) {
      if (scope.kind === "shops") throw forbidden("the comeback pairs of a shop outside your scope");
      throw notFound(`Shop ${q.shop}`);
    }
    if (!entry.inScope) throw forbidden("the comeback pairs of a shop outside your scope");
    const months = new Set(v.resolved.months);
    const settings = { days: q.days, hours: q.hours };
    const chosen = v.world.originals.filter(
      (o) =>
        o.line.shop === entry.code &&
        months.has(o.line.closed!.slice(0, 7)) &&
        windowElapsed(o.line, v.world.asOf, settings) &&
        (q.technician === undefined || o.line.technician === q.technician),
    );
    const pairs = chosen.flatMap((o) => o.comebacks).sort((a, b) => (a.original.closed! < b.original.closed! ? 1 : -1));
    const details = await lineDetails(db, scope, pairs.flatMap((p) => [p.original.id, p.followUp.id]));
    const side = (id: string, opened: string, closed: string | null): PairLine => {
      const d: LineDetail | undefined = details.get(id);
      if (!d) return { shopCode: null, roNumber: null, lineNo: null, opened, closed, hourMeter: null, component: null, technician: null, complaint: null, cause: null, correction: null };
      return { shopCode: d.shopCode, roNumber: d.roNumber, lineNo: d.lineNo, opened: d.opened, closed: d.closed, hourMeter: d.hourMeter, component: d.component, technician: d.technician, complaint: d.complaint, cause: d.cause, correction: d.correction };
    };
    const body: ComebackPairs = {
      period: v.resolved.period,
      settings,
      shop: { code: entry.code, name: entry.name },
      technician: q.technician ?? null,
      lines: chosen.length,
      withComeback: chosen.filter((o) => o.comebacks.length > 0).length,
      rule: comebackRule(q, v.resolved.period),
      pairs: pairs.map((p) => ({
        original: side(p.original.id, p.original.opened, p.original.closed),
        followUp: side(p.followUp.id, p.followUp.opened, p.followUp.closed),
        daysAfterClose: p.daysAfterClose,
        hoursAfterClose: p.hoursAfterClose,
      })),
    };
    res.json(body);
  });

  return router;
}

const FUNNEL_METHOD =
  "Comeback rate against the number of qualifying lines, around the group rate p₀, with exact binomial limits (interpolated, Spiegelhalter 2005) at 95 % and 99.8 %. A shop above the 99.8 % line has more comebacks than chance explains at its volume; one inside the funnel does not differ from the group, however it ranks. Shops below 30 lines are not plotted.";

function comebackRule(q: BenchmarkQuery, period: Period): string {
  return (
    `A comeback is a later failure line on the same machine and system that opens within ${q.days} days and ${q.hours} engine hours of the original line's close ` +
    `(hours at close interpolated between the two lines' meter readings). PM, return-for-parts visits, installs and customer damage are not counted. ` +
    `It counts against the original line's shop and technician, in the month the original closed, once its ${q.days}-day window has passed (lines closed after ${period.countedThrough} are still waiting).`
  );
}

function formulas(q: BenchmarkQuery, period: Period, anonymised: boolean): Formulas {
  return {
    comebackRate: `Comeback rate = repair lines with at least one comeback ÷ qualifying repair lines; 95 % Wilson interval; not rated below ${MINIMUM_LINES} lines. ${comebackRule(q, period)}`,
    labourEfficiency: "Labour efficiency = Σ standard (flat-rate) hours ÷ Σ actual hours, on lines with a standard time; above 100 % beats the standard.",
    partsWait: "Parts wait = calendar days from part order to receipt on part lines: median and 90th percentile (linear interpolation between ordered values).",
    backOrderRate: "Back-order rate = back-ordered part lines ÷ lines with a part ordered; 95 % Wilson interval.",
    coldStartMeasured:
      "Cold-start jobs measured = failure lines on a cold-start aid (heater plugs, grid heater, preheat relay) with at least one reading recorded (resistance, compression or voltage) ÷ those lines; 95 % Wilson interval.",
    warrantyOnTime:
      "Claims on time = repair claims submitted on or before their deadline ÷ claims submitted or past their deadline, by month of the RO close; 95 % Wilson interval.",
    funnel: FUNNEL_METHOD,
    anonymity: anonymised
      ? "Other shops are shown as letters drawn afresh for every period; their volume is a band, and their counts and intervals are withheld, so they cannot be recognised. Rates are rounded to 0.1 %."
      : null,
  };
}

/** Which shop needs a visit: above the 99.8 % limit → visit; above 95 %, or the Wilson lower limit above the group rate → watch. */
function visits(rows: ShopBenchmark[], groupWide: boolean): Visit[] {
  const out: (Visit & { rate: number })[] = [];
  for (const r of rows) {
    if (r.peer && !groupWide) continue;
    const reasons: string[] = [];
    let severity: Visit["severity"] | null = null;
    const cb = r.comeback;
    if (cb.funnel === "above_998") {
      severity = "visit";
      reasons.push(`Comeback rate ${cb.words}.`);
    } else if (cb.funnel === "above_95") {
      severity = "watch";
      reasons.push(`Comeback rate ${cb.words}.`);
    } else if (cb.aboveGroup) {
      severity = "watch";
      reasons.push(`Comeback rate ${pct(cb.value!)}: its 95 % interval (${pct(cb.lower!)}–${pct(cb.upper!)}) lies above the group rate.`);
    }
    for (const t of r.technicians ?? []) {
      if (!t.aboveGroup || t.comeback.value === null) continue;
      severity ??= "watch";
      reasons.push(
        `Technician ${t.techId} (${t.name}): ${pct(t.comeback.value)} of ${t.comeback.n} lines came back (95 % interval ${pct(t.comeback.lower!)}–${pct(t.comeback.upper!)}), above the group rate.`,
      );
    }
    if (severity) out.push({ key: r.key, label: r.label, severity, reasons, rate: cb.value ?? 0 });
  }
  out.sort((a, b) => (a.severity !== b.severity ? (a.severity === "visit" ? -1 : 1) : b.rate - a.rate));
  return out.map(({ rate: _rate, ...v }) => v);
}

