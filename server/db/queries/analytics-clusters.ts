import { sql, type RawBuilder } from "kysely";
import { HEATER_PLUG } from "../../../shared/catalog.js";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, exposureRelation, failureRelation, familiesCarrying } from "./analytics-base.js";
import type { CubeRow } from "../../analytics/cluster-cells.js";

/**
 * Failures and engine-hour exposure over engine family × build month × lot × shop × temperature band ×
 * hour band, aggregated in PostgreSQL. Exposure covers only the engine families that carry the
 * components scanned (a family with no such repair line in the warehouse cannot contribute).
 * Exposure is summed per home shop key and named after the grouping, which lets PostgreSQL hash the
 * aggregate instead of sorting every agg_exposure row; rows come in the order of the six labels.
 */
/** The lot label of failures and exposure of a part whose lot the warehouse does not track per machine. */
export const UNTRACKED_LOT = "not tracked";

/**
 * The scan cube (see the module comment). `level`:
 * - "component" (the default): one cube per part scanned, each row counting the failures of that part only,
 *   over the exposure of the engine families that carry that part (a grid heater is scanned over the family fitted with one).
 *   The lot dimension is the fitted heater-plug lot, so it applies to heater-plug failures alone; every other
 *   part's rows carry the lot UNTRACKED_LOT (its own lots are not known per machine): a plug lot is never
 *   charged with a relay's failures. Exposure (machine engine hours) is the same for every part.
 * - "system": the parts together, as one count per cell; the lot dimension applies only when the heater plug is
 *   the one part scanned.
 */
export async function scanCells(db: Db, scope: ShopScope, f: AnalyticsFilters, level: "component" | "system" = "component"): Promise<CubeRow[]> {
  const parts = level === "component" ? f.components : [null];
  const lotTracked = (part: RawBuilder<unknown>) =>
    level === "component" ? sql`${part} = ${HEATER_PLUG}` : sql`${sql.lit(f.components.length === 1 && f.components[0] === HEATER_PLUG)}`;
  const res = await analyticsRead(db, sql<{
    component: string | null; engine_family: string; build_month: string; lot: string; shop_code: string; temp_band: string; hour_band: string;
    failures: number | null; engine_hours: number | null; keys: string[] | null;
  }>`
    WITH part AS (
      SELECT coalesce(p, '') AS component FROM unnest(${sql.val(parts)}::text[]) AS p
    ), ex AS (
      SELECT x.engine_family, x.build_month, x.lot, s.shop_code, x.temp_band, x.hour_band, x.engine_hours
      FROM (
        SELECT engine_family, build_month, lot, shop_key, temp_band, hour_band, sum(engine_hours) AS engine_hours
        FROM ${exposureRelation(scope, f, true)} ex WHERE engine_family IN ${familiesCarrying(f.components)}
        GROUP BY 1, 2, 3, 4, 5, 6
      ) x JOIN dim_shop s ON s.shop_key = x.shop_key
    ), e AS (
      SELECT part.component, ex.engine_family, ex.build_month,
             CASE WHEN ${lotTracked(sql`part.component`)} THEN ex.lot ELSE ${UNTRACKED_LOT} END AS lot,
             ex.shop_code, ex.temp_band, ex.hour_band, sum(ex.engine_hours) AS engine_hours
      FROM ex JOIN part ON ${level === "component"
        ? sql`(part.component, ex.engine_family) IN (
            SELECT DISTINCT c.component_code, m.engine_family FROM fact_repair_line r
            JOIN dim_component c ON c.component_key = r.component_key JOIN dim_machine m ON m.machine_key = r.machine_key
            WHERE c.component_code = ANY(${sql.val(f.components)}::text[]))`
        : sql`true`}
      GROUP BY 1, 2, 3, 4, 5, 6, 7
    ), fl AS (
      SELECT ${level === "component" ? sql`component_code` : sql`''::text`} AS component, engine_family, build_month,
             CASE WHEN ${lotTracked(sql`component_code`)} THEN lot ELSE ${UNTRACKED_LOT} END AS lot,
             shop_code, temp_band, hour_band, count(*) AS failures,
             array_agg(repair_line_key ORDER BY opened_date) AS keys
      FROM ${failureRelation(scope, f)} fr
      GROUP BY 1, 2, 3, 4, 5, 6, 7
    )
    SELECT coalesce(e.component, fl.component) AS component, coalesce(e.engine_family, fl.engine_family) AS engine_family,
           to_char(coalesce(e.build_month, fl.build_month), 'YYYY-MM') AS build_month,
           coalesce(e.lot, fl.lot) AS lot, coalesce(e.shop_code, fl.shop_code) AS shop_code,
           coalesce(e.temp_band, fl.temp_band) AS temp_band, coalesce(e.hour_band, fl.hour_band) AS hour_band,
           fl.failures, e.engine_hours, fl.keys
    FROM e FULL JOIN fl ON e.component = fl.component AND e.engine_family = fl.engine_family
      AND e.build_month = fl.build_month AND e.lot = fl.lot AND e.shop_code = fl.shop_code AND e.temp_band = fl.temp_band
      AND e.hour_band = fl.hour_band
    ORDER BY 1, 2, 3, 4, 5, 6, 7
  `);
  return res.rows.map((r) => ({
    ...(r.component ? { component: r.component } : {}),
    engineFamily: r.engine_family,
    buildMonth: r.build_month,
    lot: r.lot,
    shopCode: r.shop_code,
    tempBand: r.temp_band,
    hourBand: r.hour_band,
    failures: Number(r.failures ?? 0),
    engineHours: Number(r.engine_hours ?? 0),
    repairLineIds: (r.keys ?? []).map(String),
  }));
}
