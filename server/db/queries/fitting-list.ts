import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { components } from "../../../shared/catalog.js";
import { coldShopCodes } from "./shops.js";
import { scopedShopCodes } from "./scope.js";

/** One machine at a cold shop without a block heater, as the query finds it. */
export interface FittingCandidate {
  shopCode: string;
  shopName: string;
  serial: string;
  modelLine: string;
  engineFamily: string;
  deliveryDate: string;
  /** latest valid engine hours, or null without readings */
  hourMeter: number | null;
  /** engine hours when the cold-start parts were last fitted (the replacement's reading, or delivery) */
  partFittedHours: number | null;
  /** the replacement's date, or delivery */
  partFittedDate: string;
  partName: string;
}

const BLOCK_HEATER = "ENG-COO-BLKHTR";
const PART_BY_AID = { glow_plugs: "ENG-CSA-HPLUG", grid_heater: "ENG-CSA-GRID" } as const;
const partName = (code: string) => components.find((c) => c.code === code)?.name ?? code;

/** The last day with data: the latest repair-line open date or meter reading. */
export async function fittingAsOf(db: Db): Promise<string | null> {
  const r = await sql<{ d: string | null }>`
    SELECT greatest((SELECT max(opened_date) FROM fact_repair_line), (SELECT max(reading_date) FROM fact_meter_reading))::text AS d
  `.execute(db);
  return r.rows[0]?.d ?? null;
}

/** The shops in scope, split into cold ones (server/db/queries/shops.ts coldShopCodes) and the others. */
export async function scopedColdShops(db: Db, scope: ShopScope): Promise<{ cold: { code: string; name: string }[]; other: string[] }> {
  const codes = scopedShopCodes(scope);
  if (codes && codes.length === 0) return { cold: [], other: [] };
  let q = db.selectFrom("dim_shop").select(["shop_code", "name"]).orderBy("shop_code");
  if (codes) q = q.where("shop_code", "in", codes);
  const [shops, cold] = await Promise.all([q.execute(), coldShopCodes(db)]);
  return {
    cold: shops.filter((s) => cold.has(s.shop_code)).map((s) => ({ code: s.shop_code, name: s.name })),
    other: shops.filter((s) => !cold.has(s.shop_code)).map((s) => s.shop_code),
  };
}

/**
 * Machines in service on `asOf` (delivered on or before it) whose current home shop is one of `shopCodes`, with no
 * block heater: none in the machine register and no repair line that fitted one. Each with its latest valid engine
 * hours (v_engine_hours, continuous across meter replacements) and the engine hours and date when its cold-start part
 * (heater-plug set, or intake grid heater on grid-heater engines) was last fitted: the last failure or install line on
 * that part, else delivery.
 */
export async function fittingCandidates(db: Db, shopCodes: readonly string[], asOf: string): Promise<FittingCandidate[]> {
  if (shopCodes.length === 0) return [];
  const r = await sql<{
    shop_code: string; shop_name: string; serial: string; model_line: string; engine_family: string; cold_start_aid: string;
    delivery_date: string; last_h: number | null; fit_h: number | null; fitted: string | null;
  }>`
    WITH cand AS (
      SELECT m.machine_key, m.serial, m.model_line, m.engine_family, m.cold_start_aid, m.delivery_date, m.delivery_hours,
             s.shop_code, s.name AS shop_name
      FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key
      WHERE s.shop_code IN (${sql.join(shopCodes.map((c) => sql`${c}`))})
        AND m.delivery_date IS NOT NULL AND m.delivery_date <= ${asOf}::date
        AND NOT m.block_heater_fitted
        AND NOT EXISTS (
          SELECT 1 FROM fact_repair_line l JOIN dim_component c ON c.component_key = l.component_key
          WHERE l.machine_key = m.machine_key AND c.component_code = ${BLOCK_HEATER} AND l.opened_date <= ${asOf}::date
        )
    ), fit AS (
      SELECT cand.machine_key, max(l.opened_date) AS fitted
      FROM cand
      JOIN fact_repair_line l ON l.machine_key = cand.machine_key
      JOIN dim_component c ON c.component_key = l.component_key
      WHERE l.line_type IN ('failure', 'install') AND l.opened_date <= ${asOf}::date
        AND c.component_code = CASE cand.cold_start_aid WHEN 'grid_heater' THEN ${PART_BY_AID.grid_heater} ELSE ${PART_BY_AID.glow_plugs} END
      GROUP BY cand.machine_key
    )
    SELECT cand.shop_code, cand.shop_name, cand.serial, cand.model_line, cand.engine_family, cand.cold_start_aid,
           cand.delivery_date::text AS delivery_date, fit.fitted::text AS fitted, h.last_h,
           CASE WHEN fit.fitted IS NULL THEN coalesce(cand.delivery_hours::double precision, h.first_h) ELSE h.fit_h END AS fit_h
    FROM cand
    LEFT JOIN fit ON fit.machine_key = cand.machine_key
    LEFT JOIN LATERAL (
      SELECT max(v.engine_hours) AS last_h, min(v.engine_hours) AS first_h,
             max(v.engine_hours) FILTER (WHERE v.reading_date <= fit.fitted) AS fit_h
      FROM v_engine_hours v WHERE v.machine_key = cand.machine_key AND v.reading_date <= ${asOf}::date
    ) h ON true
  `.execute(db);
  return r.rows.map((x) => ({
    shopCode: x.shop_code,
    shopName: x.shop_name,
    serial: x.serial,
    modelLine: x.model_line,
    engineFamily: x.engine_family,
    deliveryDate: x.delivery_date,
    hourMeter: x.last_h === null ? null : Number(x.last_h),
    partFittedHours: x.fit_h === null ? null : Number(x.fit_h),
    partFittedDate: x.fitted ?? x.delivery_date,
    partName: partName(x.cold_start_aid === "grid_heater" ? PART_BY_AID.grid_heater : PART_BY_AID.glow_plugs),
  }));
}
