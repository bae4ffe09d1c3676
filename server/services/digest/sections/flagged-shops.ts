import { benchmarkQuerySchema, type ShopBenchmarks } from "../../../../shared/schemas/benchmarks.js";
import type { Format } from "../../../../shared/format.js";
import { hasRole, type SectionSource } from "../section.js";

/** Funnel positions outside the 95 % control limits around the group's comeback rate (worse first). */
const OUTSIDE = ["above_998", "above_95", "below_998", "below_95"] as const;

/**
 * Shops whose comeback rate lies outside the funnel's 95 % limits around the group rate for the period, above
 * (more comebacks than chance explains) before below, each with its rate and the funnel's words.
 */
export function buildFlaggedShops(b: ShopBenchmarks, t: { link: (path: string) => string; format: Format }) {
  const out = b.shops
    .filter((s) => !s.peer && (OUTSIDE as readonly string[]).includes(s.comeback.funnel))
    .sort((x, y) => OUTSIDE.indexOf(x.comeback.funnel as (typeof OUTSIDE)[number]) - OUTSIDE.indexOf(y.comeback.funnel as (typeof OUTSIDE)[number]) || x.label.localeCompare(y.label));
  const group = `the group's ${t.format.percent(b.group?.comeback.value)}`;
  return {
    key: "flagged-shops",
    title: `Shops outside their benchmark limits (${b.period.label})`,
    lines: out.length
      ? out.map((s) => `${s.label}: comebacks ${t.format.percent(s.comeback.value)} against ${group}, ${s.comeback.words}.`)
      : [`Every rated shop's comeback rate is inside the 95 % limits around ${group}.`],
    links: [{ label: "Open the shop benchmarks", url: t.link("/benchmarks") }],
  };
}

/** Analysts and directors, group-wide: every shop by name. */
export const flaggedShopsSection: SectionSource<ShopBenchmarks> = {
  key: "flagged-shops",
  appliesTo: (r) => hasRole(r, "analyst", "director") && r.scope.kind === "all",
  load: (ctx) => ctx.benchmarks.shops(ctx.reader.scope, benchmarkQuerySchema.parse({})),
  build: buildFlaggedShops,
};
