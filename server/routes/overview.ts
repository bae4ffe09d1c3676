import { Router } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import type { Headline, Overview } from "../../shared/schemas/overview.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { countsByMonth } from "../db/queries/analytics-rates.js";
import { lastExposureMonth, latestLoads, machinesNeedingAttention, recordVisit, type LoadRow } from "../db/queries/overview.js";
import { listShops } from "../db/queries/shops.js";
import { poissonRate } from "../analytics/poisson.js";
import { addMonthsToMonth } from "../../shared/dates.js";
import { COLD_START_AIDS, findClusters, toCluster } from "../services/cluster-finder.js";
import { analyticsRoles } from "../../shared/roles.js";

const HEADLINES: { label: string; components: string[] }[] = [
  { label: "All failures", components: [] },
  { label: "Cold-start aids", components: COLD_START_AIDS },
  { label: "Heater-plug set", components: ["ENG-CSA-HPLUG"] },
];

export const ATTENTION_DEFINITION =
  "Over the 365 days up to the latest repair order: one point per failure visit, two more per comeback (a visit for the same component within 30 days and 100 engine hours of the previous one's close) and three more per component with three or more visits (a repeat repair). Highest score first.";

async function headlines(db: Db, scope: ShopScope): Promise<Overview["headlines"]> {
  const method =
    "Failures (first visit for a fault; comebacks excluded) per 1,000 engine hours over the twelve months ending with the last month of data, against the twelve months before; exact Poisson 95 % limits.";
  const last = await lastExposureMonth(db, scope);
  if (!last) return { thisYear: null, lastYear: null, rows: [], method };
  const thisYear = { from: addMonthsToMonth(last, -11), to: last };
  const lastYear = { from: addMonthsToMonth(last, -23), to: addMonthsToMonth(last, -12) };
  const rows = await Promise.all(
    HEADLINES.map(async (h): Promise<Headline> => {
      const f = analyticsFiltersSchema.parse({ from: `${lastYear.from}-01`, components: h.components.join(",") });
      const months = await countsByMonth(db, scope, f);
      const sum = (from: string, to: string) => {
        const inside = months.filter((r) => r.band.slice(0, 7) >= from && r.band.slice(0, 7) <= to);
        const failures = inside.reduce((s, r) => s + r.failures, 0);
        const engineHours = inside.reduce((s, r) => s + r.engineHours, 0);
        const rate = poissonRate(failures, engineHours);
        return { failures, engineHours, rate: rate ? { rate: rate.rate, lower: rate.lower, upper: rate.upper, per: rate.per, level: rate.level } : null };
      };
      const a = sum(thisYear.from, thisYear.to);
      const b = sum(lastYear.from, lastYear.to);
      return { label: h.label, components: h.components, thisYear: a, lastYear: b, change: a.rate && b.rate && b.rate.rate > 0 ? a.rate.rate / b.rate.rate : null };
    }),
  );
  return { thisYear, lastYear, rows, method };
}

function loadsByShop(rows: LoadRow[], names: Map<string, string>): Overview["loads"] {
  const groups = new Map<string | null, LoadRow[]>();
  for (const r of rows) groups.set(r.shopCode, [...(groups.get(r.shopCode) ?? []), r]);
  return [...groups]
    .sort(([a], [b]) => (a === null ? 1 : b === null ? -1 : a.localeCompare(b)))
    .map(([shopCode, files]) => {
      const finished = files.map((f) => f.finishedAt?.getTime() ?? 0).filter(Boolean);
      return {
        shopCode,
        shopName: shopCode === null ? "Group-wide files" : (names.get(shopCode) ?? shopCode),
        lastFinishedAt: finished.length ? new Date(Math.max(...finished)).toISOString() : null,
        rowsRead: files.reduce((s, f) => s + f.rowsRead, 0),
        rowsRejected: files.reduce((s, f) => s + f.rowsRejected, 0),
        files: files.map((f) => ({ ...f, finishedAt: f.finishedAt?.toISOString() ?? null })),
      };
    });
}

/** GET /api/overview: what changed since the last load and the last visit. */
export function overviewRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    const user = requireUser(req);
    const [loads, shops, head, found, attention] = await Promise.all([
      latestLoads(db, scope),
      listShops(db, scope),
      headlines(db, scope),
      findClusters(db, scope, {}),
      machinesNeedingAttention(db, scope),
    ]);
    const clusters = found.scan.signals.map((s) => toCluster(found.components, s));
    const visit = await recordVisit(db, user.sub, clusters.map((c) => c.id));
    const seen = new Set(visit.previousClusterIds ?? []);
    const body: Overview = {
      loads: loadsByShop(loads, new Map(shops.map((s) => [s.code, s.name]))),
      headlines: head,
      clusters: {
        firstVisit: visit.previousClusterIds === null,
        previousVisitAt: visit.previousVisitAt?.toISOString() ?? null,
        total: clusters.length,
        newSinceLastVisit: clusters.filter((c) => !seen.has(c.id)).map(({ repairLineIds: _ids, ...c }) => c),
      },
      attention: { windowEnd: attention.windowEnd, definition: ATTENTION_DEFINITION, machines: attention.rows },
    };
    res.json(body);
  });
  return router;
}
