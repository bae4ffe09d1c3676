import { benchmarkQuerySchema, type ShopBenchmarks } from "../../../../shared/schemas/benchmarks.js";
import type { Format } from "../../../../shared/format.js";
import { hasRole, type SectionSource } from "../section.js";

/**
 * A shop manager's own shops against the group: comeback rate and the funnel's words, labour efficiency, and
 * the other shops only as the benchmarks page gives them to a manager (groups of three or more, no names).
 */
export function buildShopPosition(b: ShopBenchmarks, t: { link: (path: string) => string; format: Format }) {
  const own = b.shops.filter((s) => !s.peer);
  const g = b.group;
  const against = (v: number | null | undefined) => (g ? ` against the group's ${t.format.percent(v)}` : "");
  const lines = own.map((s) => {
    const eff = s.efficiency.value === null ? "" : `; labour efficiency ${t.format.percent(s.efficiency.value)}${against(g?.efficiency.value)}`;
    return `${s.label}: comebacks ${t.format.percent(s.comeback.value)}${against(g?.comeback.value)}, ${s.comeback.words}${eff}.`;
  });
  if (!g && b.groupHidden) lines.push(b.groupHidden);
  if (b.peers) lines.push(`The other ${b.peers.shops} shops' comeback rates: ${b.peers.comeback.words}`);
  return {
    key: "shop-position",
    title: `Your shop against the group (${b.period.label})`,
    lines: own.length ? lines : ["None of your shops has benchmark figures yet."],
    links: [{ label: "Open the shop benchmarks", url: t.link("/benchmarks") }],
  };
}

/** Shop managers whose scope is their own shops (a manager who is also group-wide reads the group's section). */
export const shopPositionSection: SectionSource<ShopBenchmarks> = {
  key: "shop-position",
  appliesTo: (r) => hasRole(r, "manager") && r.scope.kind === "shops" && r.scope.shops.length > 0,
  load: (ctx) => ctx.benchmarks.shops(ctx.reader.scope, benchmarkQuerySchema.parse({})),
  build: buildShopPosition,
};
