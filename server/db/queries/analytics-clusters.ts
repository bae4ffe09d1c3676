import { sql } from "kysely";
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
export async function scanCells(db: Db, scope: ShopScope, f: AnalyticsFilters): Promise<CubeRow[]> {
  const res = await analyticsRead(db, sql<{
    engine_family: string; build_month: string; lot: string; shop_code: string; temp_band: string; hour_band: string;
    failures: number | null; engine_hours: number | null; keys: string[] | null;
  }>`
    WITH e AS (
      SELECT x.engine_family, x.build_month, x.lot, s.shop_code, x.temp_band, x.hour_band, x.engine_hours
      FROM (
        SELECT engine_family, build_month, lot, shop_key, temp_band, hour_band, sum(engine_hours) AS engine_hours
        FROM ${exposureRelation(scope, f, true)} ex WHERE engine_family IN ${familiesCarrying(f.components)}
        GROUP BY 1, 2, 3, 4, 5, 6
      ) x JOIN dim_shop s ON s.shop_key = x.shop_key
    ), fl AS (
      SELECT engine_family, build_month, lot, shop_code, temp_band, hour_band, count(*) AS failures,
             array_agg(repair_line_key ORDER BY opened_date) AS keys
      FROM ${failureRelation(scope, f)} fr
      GROUP BY 1, 2, 3, 4, 5, 6
    )
    SELECT coalesce(e.engine_family, fl.engine_family) AS engine_family,
           to_char(coalesce(e.build_month, fl.build_month), 'YYYY-MM') AS build_month,
           coalesce(e.lot, fl.lot) AS lot, coalesce(e.shop_code, fl.shop_code) AS shop_code,
           coalesce(e.temp_band, fl.temp_band) AS temp_band, coalesce(e.hour_band, fl.hour_band) AS hour_band,
           fl.failures, e.engine_hours, fl.keys
    FROM e FULL JOIN fl USING (engine_family, build_month, lot, shop_code, temp_band, hour_band)
    ORDER BY 1, 2, 3, 4, 5, 6
  `);
  return res.rows.map((r) => ({
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
