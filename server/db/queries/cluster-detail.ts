import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, failureRelation } from "./analytics-base.js";

export interface ClusterLineFacts {
  id: string;
  month: string; // YYYY-MM
  tempBand: string;
  hourBand: string;
  openedDate: string;
  serial: string;
  modelLine: string;
  engineFamily: string;
  homeShop: string;
  buildDate: string | null;
  lot: string;
}

/**
 * The failure lines of a cluster labelled the way the scan labelled them (failureRelation: home shop,
 * temperature band of the day the order opened, hour band, lot in service), with their machines.
 */
export async function clusterLineFacts(db: Db, scope: ShopScope, f: AnalyticsFilters, ids: readonly string[]): Promise<ClusterLineFacts[]> {
  if (!ids.length) return [];
  const res = await analyticsRead(db, sql<{
    id: string; month: string; temp_band: string; hour_band: string; opened_date: string; serial: string; model_line: string;
    engine_family: string; shop_code: string; build_date: string | null; lot: string;
  }>`
    SELECT fr.repair_line_key::text AS id, to_char(fr.month, 'YYYY-MM') AS month, fr.temp_band, fr.hour_band, fr.opened_date,
           m.serial, fr.model_line, fr.engine_family, fr.shop_code, m.build_date, fr.lot
    FROM ${failureRelation(scope, f)} fr JOIN dim_machine m ON m.machine_key = fr.machine_key
    WHERE fr.repair_line_key IN (${sql.join(ids.map((id) => sql`${id}::bigint`))})
    ORDER BY fr.opened_date
  `);
  return res.rows.map((r) => ({
    id: r.id, month: r.month, tempBand: r.temp_band, hourBand: r.hour_band, openedDate: r.opened_date, serial: r.serial,
    modelLine: r.model_line, engineFamily: r.engine_family, homeShop: r.shop_code, buildDate: r.build_date, lot: r.lot,
  }));
}

/** All failures of the filtered relation by temperature band × hour band (the background a cluster stands out from). */
export async function failureBandCounts(db: Db, scope: ShopScope, f: AnalyticsFilters): Promise<{ tempBand: string; hourBand: string; failures: number }[]> {
  const res = await analyticsRead(db, sql<{ temp_band: string; hour_band: string; n: string }>`
    SELECT temp_band, hour_band, count(*) AS n FROM ${failureRelation(scope, f)} fr GROUP BY 1, 2
  `);
  return res.rows.map((r) => ({ tempBand: r.temp_band, hourBand: r.hour_band, failures: Number(r.n) }));
}
