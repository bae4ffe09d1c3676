import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { analyticsFiltersSchema, type AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, exposureRelation, failureRelation } from "./analytics-base.js";
import { scopedShopCodes, scopeIncludes } from "./scope.js";
import { addDays } from "../../analytics/winter-forecast.js";

/**
 * Reads for the winter forecast. Every read takes a cutoff day: only data dated before it is used, so the same
 * reads serve the forecast (cutoff = the day after the data's end) and the backtest (cutoff = the held-out
 * season's first day).
 */

const ALL: ShopScope = { kind: "all" };

/** The last day with repair lines. */
export async function dataEnd(db: Db): Promise<string | null> {
  const r = await sql<{ d: string | null }>`SELECT max(opened_date)::text AS d FROM fact_repair_line`.execute(db);
  return r.rows[0]?.d ?? null;
}

export interface WinterPart {
  component: string;
  componentName: string;
  engineFamily: string;
  partNumber: string;
}

/** Cold-start-aid components with the engine families that carry them and the part number most often fitted. */
export async function coldStartParts(db: Db, cutoff: string): Promise<WinterPart[]> {
  const r = await sql<{ component_code: string; name: string; engine_family: string; part_number: string }>`
    SELECT DISTINCT ON (c.component_code, m.engine_family) c.component_code, c.name, m.engine_family, fl.part_number
    FROM fact_repair_line fl
    JOIN dim_component c ON c.component_key = fl.component_key
    JOIN dim_machine m ON m.machine_key = fl.machine_key
    WHERE c.cold_start_aid AND fl.line_type = 'failure' AND fl.part_number IS NOT NULL AND fl.opened_date < ${cutoff}::date
    GROUP BY 1, 2, 3, 4
    ORDER BY c.component_code, m.engine_family, count(*) DESC, fl.part_number
  `.execute(db);
  return r.rows.map((x) => ({ component: x.component_code, componentName: x.name, engineFamily: x.engine_family, partNumber: x.part_number }));
}

export interface WinterMachine {
  machineKey: string;
  engineFamily: string;
  /** home shop on the day before the cutoff */
  shopCode: string;
  deliveryDate: string;
  installHours: number;
  buildLot: string;
  /** valid engine-hour readings before the cutoff, by date: [day, hours] */
  trail: [string, number][];
}

/** Machines delivered before the cutoff with their home shop then and their engine-hour trail before it. */
export async function winterMachines(db: Db, cutoff: string, families: readonly string[]): Promise<WinterMachine[]> {
  if (!families.length) return [];
  const last = addDays(cutoff, -1);
  const r = await analyticsRead(db, sql<{
    machine_key: string; engine_family: string; shop_code: string; delivery_date: string; install_h: number; build_lot: string;
    days: string[] | null; hours: number[] | null;
  }>`
    SELECT m.machine_key, m.engine_family, s.shop_code, m.delivery_date::text AS delivery_date,
           coalesce(m.delivery_hours::double precision, 0) AS install_h,
           coalesce(nullif(m.heater_plug_lot, ''), 'none') AS build_lot,
           (SELECT array_agg(v.reading_date::text ORDER BY v.reading_date) FROM v_engine_hours v
             WHERE v.machine_key = m.machine_key AND v.reading_date < ${cutoff}::date) AS days,
           (SELECT array_agg(v.engine_hours ORDER BY v.reading_date) FROM v_engine_hours v
             WHERE v.machine_key = m.machine_key AND v.reading_date < ${cutoff}::date) AS hours
    FROM dim_machine m
    JOIN machine_home_shop hs ON hs.machine_key = m.machine_key AND hs.valid_from <= ${last}::date
      AND (hs.valid_to IS NULL OR hs.valid_to > ${last}::date)
    JOIN dim_shop s ON s.shop_key = hs.shop_key
    WHERE m.delivery_date < ${cutoff}::date AND m.engine_family IN (${sql.join(families.map((f) => sql`${f}`))})
    ORDER BY m.machine_key
  `);
  return r.rows.map((x) => ({
    machineKey: String(x.machine_key),
    engineFamily: x.engine_family,
    shopCode: x.shop_code,
    deliveryDate: x.delivery_date,
    installHours: Number(x.install_h),
    buildLot: x.build_lot,
    trail: (x.days ?? []).map((d, i) => [d, Number((x.hours ?? [])[i])] as [string, number]).filter((p) => Number.isFinite(p[1])),
  }));
}

export interface WinterFailure {
  machineKey: string;
  component: string;
  openedDate: string;
  hourMeter: number | null;
  /** supplier lot of the part fitted on the line ('replacement' when not written) */
  fittedLot: string;
}

const filters = (over: Partial<AnalyticsFilters>): AnalyticsFilters => ({ ...analyticsFiltersSchema.parse({}), ...over });

/** Counted failure lines (comebacks left out, as the rates and life analytics count them) of the components, opened in [from, to]. */
export async function winterFailures(db: Db, components: readonly string[], from: string | undefined, to: string): Promise<WinterFailure[]> {
  if (!components.length) return [];
  const r = await analyticsRead(db, sql<{ machine_key: string; component_code: string; opened_date: string; hour_meter: number | null; fitted_lot: string }>`
    SELECT fr.machine_key, fr.component_code, fr.opened_date::text AS opened_date, fr.hour_meter,
           coalesce(nullif(p.supplier_lot, ''), 'replacement') AS fitted_lot
    FROM ${failureRelation(ALL, filters({ components: [...components], from, to }), "current")} fr
    JOIN fact_repair_line p ON p.repair_line_key = fr.repair_line_key
    ORDER BY fr.machine_key, fr.opened_date, fr.hour_meter
  `);
  return r.rows.map((x) => ({
    machineKey: String(x.machine_key),
    component: x.component_code,
    openedDate: x.opened_date,
    hourMeter: x.hour_meter === null ? null : Number(x.hour_meter),
    fittedLot: x.fitted_lot,
  }));
}

export interface BandCounts {
  band: string;
  failures: number;
  machineDays: number;
}

/**
 * Failures and machine-days per daily-minimum band (°F set) of a component over the families that carry it,
 * before the cutoff; days without weather ("unknown") are left out.
 */
export async function winterBandCounts(db: Db, component: string, families: readonly string[], cutoff: string): Promise<BandCounts[]> {
  const f = filters({ unit: "F", components: [component], engineFamilies: [...families], to: addDays(cutoff, -1) });
  const r = await analyticsRead(db, sql<{ band: string; failures: number; machine_days: number }>`
    WITH e AS (SELECT temp_band::text AS band, sum(machine_days)::bigint AS machine_days FROM ${exposureRelation(ALL, f)} ex GROUP BY 1),
         fl AS (SELECT temp_band::text AS band, count(*)::bigint AS failures FROM ${failureRelation(ALL, f)} fr GROUP BY 1)
    SELECT coalesce(e.band, fl.band) AS band, coalesce(fl.failures, 0) AS failures, coalesce(e.machine_days, 0) AS machine_days
    FROM e FULL JOIN fl ON fl.band = e.band
  `);
  return r.rows.filter((x) => x.band !== "unknown").map((x) => ({ band: x.band, failures: Number(x.failures), machineDays: Number(x.machine_days) }));
}

/** Days per shop and daily-minimum band (°F set) before the cutoff, in the given calendar months (1–12). */
export async function shopClimateDays(db: Db, cutoff: string, months: readonly number[]): Promise<{ shopCode: string; shopName: string; band: string; days: number }[]> {
  const r = await analyticsRead(db, sql<{ shop_code: string; name: string; band: string; days: number }>`
    SELECT s.shop_code, s.name, x.band, count(*)::bigint AS days
    FROM fact_weather_day w
    JOIN dim_shop s ON s.shop_key = w.shop_key
    CROSS JOIN LATERAL (SELECT CASE
      WHEN w.tmin_c < ${(0 - 32) / 1.8} THEN 'below-0F'
      WHEN w.tmin_c < ${(20 - 32) / 1.8} THEN '0-20F'
      WHEN w.tmin_c < 0 THEN '20-32F'
      WHEN w.tmin_c < ${(45 - 32) / 1.8} THEN '32-45F'
      ELSE '45F-up' END AS band) x
    WHERE w.date < ${cutoff}::date AND extract(month FROM w.date)::int IN (${sql.join(months.map((m) => sql`${m}`))})
    GROUP BY 1, 2, 3
  `);
  return r.rows.map((x) => ({ shopCode: x.shop_code, shopName: x.name, band: x.band, days: Number(x.days) }));
}

/** Every shop's code and name. */
export async function shopNames(db: Db): Promise<Map<string, string>> {
  const rows = await db.selectFrom("dim_shop").select(["shop_code", "name"]).execute();
  return new Map(rows.map((r) => [r.shop_code, r.name]));
}

/**
 * Order → receipt days of back-ordered lines of these part numbers ordered in winter months (November–March)
 * before the cutoff, with both dates known.
 */
export async function backOrderWaits(db: Db, partNumbers: readonly string[], cutoff: string): Promise<{ partNumber: string; days: number }[]> {
  if (!partNumbers.length) return [];
  const r = await sql<{ part_number: string; days: number }>`
    SELECT fl.part_number, (fl.part_received_date - fl.part_ordered_date) AS days
    FROM fact_repair_line fl
    WHERE fl.back_ordered AND fl.part_ordered_date IS NOT NULL AND fl.part_received_date IS NOT NULL
      AND fl.part_received_date >= fl.part_ordered_date
      AND fl.part_received_date < ${cutoff}::date
      AND extract(month FROM fl.part_ordered_date)::int IN (11, 12, 1, 2, 3)
      AND fl.part_number IN (${sql.join(partNumbers.map((p) => sql`${p}`))})
    ORDER BY 1, 2
  `.execute(db);
  return r.rows.map((x) => ({ partNumber: x.part_number, days: Number(x.days) }));
}

export interface StockRow {
  shopCode: string;
  shopName: string;
  partNumber: string;
  quantity: number;
  updatedBy: string;
  updatedAt: string;
}

/** Stock counts of the shops in scope. */
export async function listWinterStock(db: Db, scope: ShopScope): Promise<StockRow[]> {
  const shops = scopedShopCodes(scope);
  if (shops && !shops.length) return [];
  let q = db
    .selectFrom("winter_stock as w")
    .leftJoin("dim_shop as s", "s.shop_code", "w.shop_code")
    .select(["w.shop_code", "s.name", "w.part_number", "w.quantity", "w.updated_by_name", "w.updated_at"])
    .orderBy("w.shop_code")
    .orderBy("w.part_number");
  if (shops) q = q.where("w.shop_code", "in", shops);
  const rows = await q.execute();
  return rows.map((r) => ({
    shopCode: r.shop_code,
    shopName: r.name ?? r.shop_code,
    partNumber: r.part_number,
    quantity: r.quantity,
    updatedBy: r.updated_by_name,
    updatedAt: new Date(r.updated_at).toISOString(),
  }));
}

/**
 * Sets a shop's count of a part number and records the change (old and new quantity, who, when) in one
 * transaction. The caller has checked the shop is in the user's scope and the part number is a known one.
 */
export async function setWinterStock(
  db: Db,
  scope: ShopScope,
  input: { shopCode: string; partNumber: string; quantity: number },
  actor: { sub: string; name: string },
): Promise<void> {
  if (!scopeIncludes(scope, input.shopCode)) throw new Error("shop outside the caller's scope");
  await db.transaction().execute(async (trx) => {
    const old = await trx
      .selectFrom("winter_stock")
      .select("quantity")
      .where("shop_code", "=", input.shopCode)
      .where("part_number", "=", input.partNumber)
      .forUpdate()
      .executeTakeFirst();
    await trx
      .insertInto("winter_stock")
      .values({ shop_code: input.shopCode, part_number: input.partNumber, quantity: input.quantity, updated_by_sub: actor.sub, updated_by_name: actor.name })
      .onConflict((oc) =>
        oc.columns(["shop_code", "part_number"]).doUpdateSet({ quantity: input.quantity, updated_by_sub: actor.sub, updated_by_name: actor.name, updated_at: sql`now()` }),
      )
      .execute();
    await trx
      .insertInto("winter_stock_event")
      .values({ shop_code: input.shopCode, part_number: input.partNumber, old_quantity: old?.quantity ?? null, new_quantity: input.quantity, actor_sub: actor.sub, actor_name: actor.name })
      .execute();
  });
}

/** Whether a shop code exists. */
export async function shopExists(db: Db, shopCode: string): Promise<boolean> {
  return (await db.selectFrom("dim_shop").select("shop_code").where("shop_code", "=", shopCode).executeTakeFirst()) !== undefined;
}
