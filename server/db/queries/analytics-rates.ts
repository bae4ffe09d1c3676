import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, exposureRelation, failureRelation } from "./analytics-base.js";

export interface BandCount {
  band: string;
  failures: number;
  machineDays: number;
  engineHours: number;
}

/** Failures and exposure grouped by one label column shared by both relations (hour_band, temp_band, month). */
async function countsBy(db: Db, scope: ShopScope, f: AnalyticsFilters, column: "hour_band" | "temp_band" | "month"): Promise<BandCount[]> {
  const col = sql.ref(column);
  const res = await analyticsRead(db, sql<{ band: string; failures: number; machine_days: number; engine_hours: number }>`
    WITH e AS (SELECT ${col}::text AS band, sum(machine_days)::bigint AS machine_days, sum(engine_hours) AS engine_hours
               FROM ${exposureRelation(scope, f)} ex GROUP BY 1),
         fl AS (SELECT ${col}::text AS band, count(*)::bigint AS failures FROM ${failureRelation(scope, f)} fr GROUP BY 1)
    SELECT coalesce(e.band, fl.band) AS band, coalesce(fl.failures, 0) AS failures,
           coalesce(e.machine_days, 0) AS machine_days, coalesce(e.engine_hours, 0) AS engine_hours
    FROM e FULL JOIN fl ON fl.band = e.band
    ORDER BY 1
  `);
  return res.rows.map((r) => ({ band: r.band, failures: Number(r.failures), machineDays: Number(r.machine_days), engineHours: Number(r.engine_hours) }));
}

export const countsByHourBand = (db: Db, scope: ShopScope, f: AnalyticsFilters) => countsBy(db, scope, f, "hour_band");
export const countsByTemperatureBand = (db: Db, scope: ShopScope, f: AnalyticsFilters) => countsBy(db, scope, f, "temp_band");
export const countsByMonth = (db: Db, scope: ShopScope, f: AnalyticsFilters) => countsBy(db, scope, f, "month");

/** Failures by component and the total engine hours of the filtered fleet. */
export async function countsByComponent(db: Db, scope: ShopScope, f: AnalyticsFilters) {
  const [fails, exp] = await Promise.all([
    analyticsRead(db, sql<{ component_code: string; failures: number }>`
      SELECT component_code, count(*)::bigint AS failures FROM ${failureRelation(scope, f)} fr GROUP BY 1 ORDER BY 2 DESC, 1
    `),
    analyticsRead(db, sql<{ engine_hours: number | null }>`SELECT sum(engine_hours) AS engine_hours FROM ${exposureRelation(scope, f)} ex`),
  ]);
  return {
    engineHours: Number(exp.rows[0]?.engine_hours ?? 0),
    rows: fails.rows.map((r) => ({ component: r.component_code, failures: Number(r.failures) })),
  };
}

export type CompareBy = "lot" | "engineFamily" | "shop";

/**
 * Failures and engine hours of two groups of the filtered fleet: group A has the attribute (heater-plug lot,
 * engine family or home shop) equal to `a`; group B equal to `b`, or, without `b`, every other value.
 * Failures and exposure carry the same labels (failureRelation / exposureRelation), so each group's rate is
 * its own failures over its own hours. A lot comparison reads agg_exposure, which keeps the lot.
 */
export async function countsForTwoGroups(
  db: Db,
  scope: ShopScope,
  f: AnalyticsFilters,
  by: CompareBy,
  a: string,
  b: string | undefined,
): Promise<{ a: { failures: number; engineHours: number }; b: { failures: number; engineHours: number } }> {
  const value = by === "shop" ? (v: string) => v.toUpperCase() : (v: string) => v;
  const group = (t: string) => {
    const c = sql.ref(`${t}.${by === "lot" ? "lot" : by === "engineFamily" ? "engine_family" : "shop_code"}`);
    return sql`CASE WHEN ${c} = ${value(a)} THEN 'A' WHEN ${b === undefined ? sql`${c} <> ${value(a)}` : sql`${c} = ${value(b)}`} THEN 'B' END`;
  };
  const res = await analyticsRead(db, sql<{ grp: string; failures: string | null; engine_hours: number | null }>`
    WITH e AS (SELECT ${group("ex")} AS grp, sum(engine_hours)::double precision AS engine_hours
               FROM ${exposureRelation(scope, f, by === "lot")} ex GROUP BY 1),
         fl AS (SELECT ${group("fr")} AS grp, count(*)::bigint AS failures FROM ${failureRelation(scope, f)} fr GROUP BY 1)
    SELECT coalesce(e.grp, fl.grp) AS grp, fl.failures, e.engine_hours
    FROM e FULL JOIN fl ON fl.grp = e.grp
    WHERE coalesce(e.grp, fl.grp) IS NOT NULL
  `);
  const pick = (g: string) => {
    const r = res.rows.find((x) => x.grp === g);
    return { failures: Number(r?.failures ?? 0), engineHours: Number(r?.engine_hours ?? 0) };
  };
  return { a: pick("A"), b: pick("B") };
}

/** Failures and engine hours by month × hour band × temperature band: the cells of the standardised monthly chart. */
export async function countsByMonthCell(db: Db, scope: ShopScope, f: AnalyticsFilters): Promise<{ month: string; hourBand: string; tempBand: string; failures: number; engineHours: number }[]> {
  const res = await analyticsRead(db, sql<{ month: string; hour_band: string; temp_band: string; failures: string | null; engine_hours: number | null }>`
    WITH e AS (SELECT month, hour_band, temp_band, sum(engine_hours) AS engine_hours FROM ${exposureRelation(scope, f)} ex GROUP BY 1, 2, 3),
         fl AS (SELECT month, hour_band, temp_band, count(*)::bigint AS failures FROM ${failureRelation(scope, f)} fr GROUP BY 1, 2, 3)
    SELECT to_char(coalesce(e.month, fl.month), 'YYYY-MM') AS month, coalesce(e.hour_band, fl.hour_band) AS hour_band,
           coalesce(e.temp_band, fl.temp_band) AS temp_band, fl.failures, e.engine_hours
    FROM e FULL JOIN fl ON fl.month = e.month AND fl.hour_band = e.hour_band AND fl.temp_band = e.temp_band
  `);
  return res.rows.map((r) => ({ month: r.month, hourBand: r.hour_band, tempBand: r.temp_band, failures: Number(r.failures ?? 0), engineHours: Number(r.engine_hours ?? 0) }));
}
