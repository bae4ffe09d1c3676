/** The rows of the shop benchmarks: one per shop as the caller sees it, its technicians, and the group's. */
import { share } from "./kpis.js";
import { kpiFigures, shareFigure } from "./benchmark-figures.js";
import { comebackFigure } from "./benchmark-funnel.js";
import type { Band } from "./benchmark-bands.js";
import type { LedgerCell } from "./benchmark-ledger.js";
import type { ShownShop } from "./peer-groups.js";
import { MINIMUM_LINES, type ShopBenchmark, type ShopBenchmarks, type TechnicianRow } from "../../shared/schemas/benchmarks.js";

/** Technicians by id with their comeback rate, flagged when its Wilson lower limit is above the group rate p0. */
export function technicianRows(techs: LedgerCell["techs"], names: ReadonlyMap<string, string>, p0: number | null): TechnicianRow[] {
  return [...techs]
    .sort((a, b) => (a[0] < b[0] ? -1 : 1))
    .map(([techId, t]) => {
      const s = share(t.withComeback, t.lines);
      return {
        techId,
        name: names.get(techId) ?? techId,
        comeback: shareFigure(s, false, "no qualifying repair lines", MINIMUM_LINES),
        aboveGroup: t.lines >= MINIMUM_LINES && p0 !== null && (s.estimate?.lower ?? 0) > p0,
      };
    });
}

/** One shop's row: a named shop with its counts and technicians, a peer with its band and rounded rates only. */
export function shopRow(shop: ShownShop, c: LedgerCell, band: Band, p0: number | null, anyClaims: boolean, techNames: ReadonlyMap<string, string>): ShopBenchmark {
  return {
    key: shop.key,
    label: shop.label,
    peer: shop.peer,
    shopCode: shop.peer ? null : shop.code,
    name: shop.peer ? null : shop.name,
    lines: shop.peer ? null : c.lines,
    volumeBand: band.label,
    comeback: comebackFigure(c, p0, shop.peer ? band : null),
    ...kpiFigures(c, shop.peer, anyClaims),
    technicians: shop.peer ? null : technicianRows(c.techs, techNames, p0),
    drillDown: !shop.peer,
  };
}

/** The whole group's figures. */
export function groupRow(g: LedgerCell, anyClaims: boolean): NonNullable<ShopBenchmarks["group"]> {
  return {
    lines: g.lines,
    comeback: shareFigure(share(g.withComeback, g.lines), false, "no qualifying repair lines"),
    ...kpiFigures(g, false, anyClaims),
  };
}
