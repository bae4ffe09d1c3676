import { sql, type QueryResult, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { scopedShopCodes } from "./scope.js";
import { hourBandSql, inTemperatureBandsSql, storageBandSql, temperatureBandSql, unitBandOfStorageSql } from "../../../shared/band-sql.js";
import { HEATER_PLUG } from "../../../shared/catalog.js";

/** Comeback window used to keep repeat visits for one fault out of failure counts (DOMAIN.md, common practice). */
export const COMEBACK_DAYS = 30;
export const COMEBACK_HOURS = 100;

/**
 * Runs an analytics read in a transaction of its own with JIT compilation off. These plans carry long CASE
 * expressions (the bands) through joins of large relations: once the planner's estimate passes
 * jit_above_cost, compiling them took about a second (977 ms of the cluster scan's 6 s at the demo's scale 5)
 * and saved far less. The ETL's merges and the exposure rebuild turn it off for the same reason.
 */
export async function analyticsRead<R>(db: Db, query: RawBuilder<R>): Promise<QueryResult<R>> {
  return await db.transaction().execute(async (trx) => {
    await sql`SET LOCAL jit = off`.execute(trx);
    return await query.execute(trx);
  });
}

const and = (parts: RawBuilder<unknown>[]) => (parts.length ? sql.join(parts, sql` AND `) : sql`TRUE`);
const inList = (col: RawBuilder<unknown>, values: readonly string[]) => sql`${col} IN (${sql.join(values.map((v) => sql`${v}`))})`;
const monthStart = (m: string) => `${m}-01`;

/**
 * Conditions on the machine cohort and home shop that agg_exposure and the failure lines share.
 * `t` is the alias of a relation with columns engine_family, model_line, build_month, lot, shop_code (and, when
 * the filters name temperature or hour bands, storage_band and hour_band). A temperature-band filter of
 * either unit selects the storage bands it is the union of, so it selects the same days whatever unit the
 * answer is grouped in. The caller's shop scope is always applied.
 */
export function cohortConditions(t: string, scope: ShopScope, f: AnalyticsFilters): RawBuilder<unknown> {
  const c = (name: string) => sql.ref(`${t}.${name}`);
  const parts: RawBuilder<unknown>[] = [];
  const scoped = scopedShopCodes(scope);
  if (scoped) parts.push(scoped.length ? inList(c("shop_code"), scoped) : sql`FALSE`);
  if (f.shops.length) parts.push(inList(c("shop_code"), f.shops.map((s) => s.toUpperCase())));
  if (f.engineFamilies.length) parts.push(inList(c("engine_family"), f.engineFamilies));
  if (f.modelLines.length) parts.push(inList(c("model_line"), f.modelLines));
  if (f.lots.length) parts.push(inList(c("lot"), f.lots));
  if (f.buildFrom) parts.push(sql`${c("build_month")} >= ${monthStart(f.buildFrom)}::date`);
  if (f.buildTo) parts.push(sql`${c("build_month")} <= ${monthStart(f.buildTo)}::date`);
  if (f.tempBands.length) parts.push(inTemperatureBandsSql(c("storage_band"), f.tempBands));
  if (f.hourBands.length) parts.push(inList(c("hour_band"), f.hourBands));
  return and(parts);
}

const FLEET_COLUMNS = ["engine_family", "model_line", "shop_key", "month", "hour_band", "machine_days", "engine_hours"];
const CUBE_COLUMNS = [...FLEET_COLUMNS, "build_month", "lot", "machines"];

/**
 * Exposure rows with the shop code inside the date window: agg_exposure when the query needs the build
 * cohort or the lot (or `cube` is set), otherwise the much smaller agg_exposure_fleet. temp_band is the band
 * of the filters' unit the stored storage band lies in; storage_band the stored one.
 */
export function exposureRelation(scope: ShopScope, f: AnalyticsFilters, cube = false): RawBuilder<unknown> {
  const window: RawBuilder<unknown>[] = [];
  if (f.from) window.push(sql`e.month >= date_trunc('month', ${f.from}::date)::date`);
  if (f.to) window.push(sql`e.month <= ${f.to}::date`);
  const whole = cube || f.lots.length || f.buildFrom || f.buildTo;
  const table = whole ? sql`agg_exposure` : sql`agg_exposure_fleet`;
  const columns = sql.join((whole ? CUBE_COLUMNS : FLEET_COLUMNS).map((c) => sql.ref(`e.${c}`)));
  return sql`(
    SELECT * FROM (
      SELECT ${columns}, e.temp_band AS storage_band, ${unitBandOfStorageSql(f.unit, sql.ref("e.temp_band"))} AS temp_band, s.shop_code
      FROM ${table} e JOIN dim_shop s ON s.shop_key = e.shop_key WHERE ${and(window)}
    ) x
    WHERE ${cohortConditions("x", scope, f)}
  )`;
}

/**
 * Failure lines labelled like the exposure: the machine's cohort and the home shop it had on the day the
 * repair order opened (machine_home_shop: a machine that moved counts at its old shop before the move, at the
 * new one from the move's day), that shop's daily minimum temperature band on that day (temp_band in the
 * filters' unit, storage_band as the exposure stores it), the engine-hour band
 * of the hour meter, and the heater-plug lot fitted at the time. Only line_type 'failure'; a line that begins within
 * COMEBACK_DAYS and COMEBACK_HOURS of an earlier line's close on the same machine and component is a
 * comeback for the same fault and is not counted again. Failure lines are read from the partial failure
 * index and the comeback test probes (component_key, machine_key, opened_date) (migration 0050).
 *
 * `shopOf: "current"` labels every line with the machine's current home shop instead (dim_machine.home_shop_key),
 * for the per-machine reads that count a machine's whole history at that shop (machinesCarrying: life units).
 */
export function failureRelation(scope: ShopScope, f: AnalyticsFilters, shopOf: "day" | "current" = "day"): RawBuilder<unknown> {
  const window: RawBuilder<unknown>[] = [sql`fl.line_type = 'failure'`];
  if (f.from) window.push(sql`fl.opened_date >= ${f.from}::date`);
  if (f.to) window.push(sql`fl.opened_date <= ${f.to}::date`);
  if (f.components.length) window.push(inList(sql.ref("c.component_code"), f.components));
  return sql`(
    SELECT * FROM (
      SELECT fl.repair_line_key, fl.machine_key, fl.opened_date, fl.hour_meter::double precision AS hour_meter,
             c.component_code, c.system, m.engine_family, m.model_line, s.shop_code, hs.shop_key,
             date_trunc('month', coalesce(m.build_date, m.delivery_date))::date AS build_month,
             date_trunc('month', fl.opened_date)::date AS month,
             CASE WHEN r.repl_date IS NOT NULL AND fl.opened_date > r.repl_date THEN r.repl_lot
                  ELSE coalesce(nullif(m.heater_plug_lot, ''), 'none') END AS lot,
             ${temperatureBandSql(f.unit, sql`w.tmin_c`)} AS temp_band, ${storageBandSql(sql`w.tmin_c`)} AS storage_band,
             ${hourBandSql(sql`fl.hour_meter`)} AS hour_band
      FROM fact_repair_line fl
      JOIN dim_component c ON c.component_key = fl.component_key
      JOIN dim_machine m ON m.machine_key = fl.machine_key
      ${shopOf === "current"
        ? sql`JOIN LATERAL (SELECT m.home_shop_key AS shop_key) hs ON hs.shop_key IS NOT NULL`
        : sql`JOIN machine_home_shop hs ON hs.machine_key = fl.machine_key AND hs.valid_from <= fl.opened_date
        AND (hs.valid_to IS NULL OR hs.valid_to > fl.opened_date)`}
      JOIN dim_shop s ON s.shop_key = hs.shop_key
      LEFT JOIN fact_weather_day w ON w.shop_key = hs.shop_key AND w.date = fl.opened_date
      LEFT JOIN (
        SELECT DISTINCT ON (p.machine_key) p.machine_key, p.opened_date AS repl_date,
               coalesce(nullif(p.supplier_lot, ''), 'replacement') AS repl_lot
        FROM fact_repair_line p
        WHERE p.line_type = 'failure'
          AND p.component_key = (SELECT component_key FROM dim_component WHERE component_code = ${HEATER_PLUG})
        ORDER BY p.machine_key, p.opened_date
      ) r ON r.machine_key = fl.machine_key
      WHERE ${and(window)}
        AND NOT EXISTS (
          SELECT 1 FROM fact_repair_line p
          WHERE p.machine_key = fl.machine_key AND p.component_key = fl.component_key
            AND p.repair_line_key <> fl.repair_line_key
            AND p.opened_date < fl.opened_date
            AND fl.opened_date <= coalesce(p.closed_date, p.opened_date) + ${COMEBACK_DAYS}::integer
            AND (fl.hour_meter IS NULL OR p.hour_meter IS NULL OR fl.hour_meter - p.hour_meter <= ${COMEBACK_HOURS}::numeric)
        )
    ) y WHERE ${cohortConditions("y", scope, f)}
  )`;
}

/** The engine families that carry any of these components: those with at least one repair line of them. */
export function familiesCarrying(componentCodes: readonly string[]): RawBuilder<unknown> {
  return sql`(
    SELECT DISTINCT m.engine_family FROM fact_repair_line fl
    JOIN dim_component c ON c.component_key = fl.component_key JOIN dim_machine m ON m.machine_key = fl.machine_key
    WHERE c.component_code IN (${sql.join(componentCodes.map((c) => sql`${c}`))})
  )`;
}

/**
 * Machines of the families that carry a component, with cohort labels (the shop: the current home shop, for the
 * machine's whole history; join failureRelation(…, "current") to them) and their engine-hour trail:
 * install hours (the delivery reading), first and last valid engine hours and the first reading date.
 * Only machines that pass the machine-level filters (scope, shops, families, model lines, build window)
 * are returned, so the caller's later filter on the same labels leaves them all.
 */
export function machinesCarrying(component: string, scope: ShopScope, f: AnalyticsFilters): RawBuilder<unknown> {
  const machineLevel: AnalyticsFilters = { ...f, lots: [], tempBands: [], hourBands: [] };
  return sql`(
    SELECT m.*, t.first_h, t.last_h, t.first_d
    FROM (
      SELECT m.machine_key, m.engine_family, m.model_line, s.shop_code, s.climate_zone, m.delivery_date,
             date_trunc('month', coalesce(m.build_date, m.delivery_date))::date AS build_month,
             coalesce(nullif(m.heater_plug_lot, ''), 'none') AS build_lot,
             coalesce(m.delivery_hours::double precision, 0) AS install_h
      FROM dim_machine m
      JOIN dim_shop s ON s.shop_key = m.home_shop_key
      WHERE m.engine_family IN ${familiesCarrying([component])}
    ) m
    JOIN agg_machine_trail t ON t.machine_key = m.machine_key
    WHERE ${cohortConditions("m", scope, machineLevel)}
  )`;
}
