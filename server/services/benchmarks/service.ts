/**
 * Benchmarks of comebacks, labour, parts and claims per shop and period, with a funnel, a monthly trend and the
 * comeback pairs behind a figure. A caller whose scope is a shop list sees those shops by name and the other
 * shops only as groups of three or more per figure (analytics/peer-groups.ts): no row, point or series of one
 * other shop; the pairs only of their own shops.
 */
import type { Db } from "../../db/database.js";
import { dataVersion } from "../../db/queries/data-version.js";
import { lineDetails, type LineDetail } from "../../db/queries/benchmarks.js";
import { ResultCache } from "../result-cache.js";
import { windowElapsed } from "../../analytics/comebacks.js";
import { sumCells } from "../../analytics/benchmark-ledger.js";
import { monthsEnding } from "../../analytics/benchmark-periods.js";
import { funnelCurve, funnelPoint } from "../../analytics/benchmark-funnel.js";
import { groupRow, shopRow } from "../../analytics/benchmark-shop-rows.js";
import { trendPoints } from "../../analytics/benchmark-trend.js";
import { visits } from "../../analytics/benchmark-visits.js";
import { GROUP_HIDDEN, peerSummary } from "../../analytics/peer-groups.js";
import { loadWorld, type World } from "./world.js";
import { loadView, scopeKey, type View } from "./view.js";
import { comebackRule, FUNNEL_METHOD, formulas, TREND_METHOD } from "./texts.js";
import { benchmarkLines, fixCycle, waits } from "./details.js";
import type { BenchmarkLines, BenchmarkLinesQuery, FixCycle, Waits } from "../../../shared/schemas/benchmark-details.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type {
  BenchmarkQuery,
  ComebackPairs,
  ComebackPairsQuery,
  Funnel,
  FunnelPoint,
  PairLine,
  ShopBenchmarks,
  Trend,
  TrendQuery,
} from "../../../shared/schemas/benchmarks.js";

export interface BenchmarkService {
  shops(scope: ShopScope, q: BenchmarkQuery): Promise<ShopBenchmarks>;
  funnel(scope: ShopScope, q: BenchmarkQuery): Promise<Funnel>;
  trend(scope: ShopScope, q: TrendQuery): Promise<Trend>;
  /** null when the shop is unknown or outside the scope */
  comebackPairs(scope: ShopScope, q: ComebackPairsQuery): Promise<ComebackPairs | null>;
  /** the lines behind one KPI of one shop; null when the shop is unknown or outside the scope */
  lines(scope: ShopScope, q: BenchmarkLinesQuery): Promise<BenchmarkLines | null>;
  waits(scope: ShopScope, q: BenchmarkQuery): Promise<Waits>;
  fixCycle(scope: ShopScope, q: BenchmarkQuery): Promise<FixCycle>;
}

export function benchmarkService(db: Db): BenchmarkService {
  const worlds = new ResultCache<World>(20);

  async function view(scope: ShopScope, q: BenchmarkQuery): Promise<View> {
    const settings = { days: q.days, hours: q.hours };
    const world = await worlds.get(`${scopeKey(scope)}|${q.days}|${q.hours}`, await dataVersion(db), () => loadWorld(db, scope, settings));
    return loadView(db, world, scope, q);
  }
  const cellOf = (v: View, code: string) => sumCells(v.world.ledger, [code], v.resolved.months, v.claims);

  return {
    async shops(scope, q) {
      const v = await view(scope, q);
      const period = v.resolved.period;
      const rows = v.shops.filter((s) => !s.peer).map((s) => shopRow(s, cellOf(v, s.code), v.bands.get(s.code)!, v.p0, v.anyClaims, v.world.techNames));
      // the other shops leave only as groups of three or more (analytics/peer-groups.ts), from their exact rows
      const peerRows = v.shops.filter((s) => s.peer).map((s) => shopRow({ ...s, peer: false }, cellOf(v, s.code), v.bands.get(s.code)!, v.p0, v.anyClaims, v.world.techNames));
      return {
        period,
        settings: { days: q.days, hours: q.hours },
        viewer: { groupWide: v.groupWide, ownShops: scope.kind === "all" ? [] : [...scope.shops] },
        formulas: formulas(q, period, !v.groupWide),
        group: v.groupShown ? groupRow(v.groupCell, v.anyClaims) : null,
        groupHidden: v.groupShown ? null : GROUP_HIDDEN,
        shops: rows,
        peers: v.groupWide ? null : peerSummary(peerRows),
        visits: visits(rows, v.groupWide),
      };
    },

    async funnel(scope, q) {
      const v = await view(scope, q);
      const points: FunnelPoint[] = [];
      const notRated: string[] = [];
      // without a group figure there is no funnel to place a shop on
      for (const s of v.shops.filter((x) => !x.peer && v.groupShown)) {
        const point = funnelPoint(s, cellOf(v, s.code), v.bands.get(s.code)!, v.p0);
        if (point) points.push(point);
        else notRated.push(s.label);
      }
      return {
        period: v.resolved.period,
        settings: { days: q.days, hours: q.hours },
        groupRate: v.p0,
        groupLines: v.groupShown ? v.groupCell.lines : null,
        groupHidden: v.groupShown ? null : GROUP_HIDDEN,
        limits: funnelCurve(v.p0, points),
        points,
        notRated,
        method: FUNNEL_METHOD,
      };
    },

    async trend(scope, q) {
      const v = await view(scope, q);
      const last = v.resolved.months[v.resolved.months.length - 1]!;
      const points = (codes: string[], peer: boolean) => trendPoints(v.world.ledger, v.claims, codes, last, q.months, peer);
      return {
        period: v.resolved.period,
        settings: { days: q.days, hours: q.hours },
        months: monthsEnding(last, q.months),
        group: v.groupShown ? points(v.world.shops.map((s) => s.code), false) : [],
        groupHidden: v.groupShown ? null : GROUP_HIDDEN,
        series: v.shops.filter((s) => !s.peer).map((s) => ({ key: s.key, label: s.label, peer: s.peer, points: points([s.code], s.peer) })),
        method: TREND_METHOD,
      };
    },

    async lines(scope, q) {
      const v = await view(scope, q);
      const entry = v.world.shops.find((s) => s.code === q.shop);
      if (!entry?.inScope) return null;
      return benchmarkLines(db, v, q, { code: entry.code, name: entry.name }, scope);
    },

    async waits(scope, q) {
      return waits(db, await view(scope, q));
    },

    async fixCycle(scope, q) {
      return fixCycle(db, await view(scope, q), scope, { days: q.days, hours: q.hours });
    },

    async comebackPairs(scope, q) {
      const v = await view(scope, q);
      const entry = v.world.shops.find((s) => s.code === q.shop);
      if (!entry?.inScope) return null;
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
      return {
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
    },
  };
}
