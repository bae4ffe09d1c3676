import { winterForecastQuerySchema, type WinterForecast, type WinterForecastRow } from "../../../../shared/schemas/winter.js";
import type { Format } from "../../../../shared/format.js";
import { winterForecast } from "../../winter/winter-service.js";
import { capped, hasRole, type SectionSource } from "../section.js";

/** The part of a forecast the digest says: the period, and per shop and part the expectation and the stock gap. */
export interface WinterDigestData {
  period: WinterForecast["period"];
  rows: Pick<WinterForecastRow, "shopCode" | "componentName" | "partNumber" | "expected" | "lower" | "upper" | "hold" | "onHand" | "gap" | "orderBy" | "orderNow">[];
}

/**
 * Next winter's expected cold-start failures for the reader's shops, then the stock gaps to close, earliest
 * order-by date first ("order now" when that date has passed). Rows without a gap are summed, not listed.
 */
export function buildWinter(d: WinterDigestData, t: { link: (path: string) => string; format: Format }) {
  const f = t.format;
  const title = `Winter forecast and stock gaps, ${f.date(d.period.from)} – ${f.date(d.period.to)}`;
  const links = [{ label: "Open winter readiness", url: t.link("/winter") }];
  if (!d.rows.length) return { key: "winter", title, lines: ["No machines in your shops carry a cold-start part the forecast covers."], links };
  const shops = new Set(d.rows.map((r) => r.shopCode));
  const total = d.rows.reduce((s, r) => s + r.expected, 0);
  const summary = `${f.quantity("plain", total)} cold-start part failures expected over the period at ${shops.size === 1 ? `shop ${[...shops][0]}` : `${shops.size} shops`}.`;
  const gaps = d.rows
    .filter((r) => r.gap > 0)
    .sort((a, b) => a.orderBy.localeCompare(b.orderBy) || b.gap - a.gap || a.shopCode.localeCompare(b.shopCode));
  const gapLines = gaps.map(
    (r) =>
      `${r.shopCode} ${r.componentName} (${r.partNumber}): ${f.quantity("plain", r.expected)} expected (90 % interval ${f.count(r.lower)}–${f.count(r.upper)}); ` +
      `hold ${f.count(r.hold)}, on hand ${r.onHand === null ? "not entered" : f.count(r.onHand)}, short by ${f.count(r.gap)}; ` +
      (r.orderNow ? `order now (the order-by date ${f.date(r.orderBy)} has passed).` : `order by ${f.date(r.orderBy)}.`),
  );
  const lines = [
    summary,
    ...(gapLines.length ? capped(gapLines, 8, "stock gaps") : ["Stock on hand covers every part's demand over its lead time at the chosen service level."]),
  ];
  return { key: "winter", title, lines, links };
}

/** Analysts, directors and managers: the winter-readiness page's readers, each for the shops they may see. */
export const winterSection: SectionSource<WinterDigestData> = {
  key: "winter",
  appliesTo: (r) => hasRole(r, "analyst", "director") || (hasRole(r, "manager") && (r.scope.kind === "all" || r.scope.shops.length > 0)),
  load: async (ctx) => {
    const f = await winterForecast(ctx.db, ctx.reader.scope, winterForecastQuerySchema.parse({}), ctx.date);
    return { period: f.period, rows: f.rows };
  },
  build: buildWinter,
};
