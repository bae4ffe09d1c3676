import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, cohortConditions, failureRelation, machinesCarrying } from "./analytics-base.js";

export interface LifeUnit {
  machineKey: string;
  /** engine hours since the part was fitted */
  time: number;
  entry: number;
  event: 0 | 1;
  lot: string;
  shopCode: string;
  climateZone: string | null;
  engineFamily: string;
  modelLine: string;
  buildMonth: string;
  repairLineKey: string | null;
}

/**
 * Fitted parts of one component as life units. The first unit is fitted at delivery (the machine's
 * delivery hour reading) with the build lot; each failure line ends a unit and fits the next one, with
 * the lot written on that line. The last unit is right-censored at the machine's last valid engine hours.
 * A trail that starts more than 30 days after delivery gives the first unit a delayed entry.
 * Only machines that can carry the component (those of the filtered engine families) are units.
 * Each machine's units are numbered 1 … failures + 1 by generate_series and matched to the failure that ends
 * and the one that starts them by hash joins, one pass for all machines.
 */
export async function lifeUnits(db: Db, scope: ShopScope, f: AnalyticsFilters, component: string): Promise<LifeUnit[]> {
  const ff: AnalyticsFilters = { ...f, components: [component], lots: [], tempBands: [], hourBands: [] };
  const unitFilter: AnalyticsFilters = { ...f, tempBands: [], hourBands: [] };
  const res = await analyticsRead(db, sql<{
    machine_key: string; start_h: number; end_h: number; entry_h: number; event: number; lot: string; shop_code: string;
    climate_zone: string | null; engine_family: string; model_line: string; build_month: string; repair_line_key: string | null;
  }>`
    WITH mach AS ${machinesCarrying(component, scope, unitFilter)}, fails AS (
      SELECT fr.machine_key, fr.repair_line_key, fr.hour_meter, coalesce(nullif(p.supplier_lot, ''), 'replacement') AS fitted_lot,
             row_number() OVER (PARTITION BY fr.machine_key ORDER BY fr.hour_meter, fr.opened_date) AS k
      -- labelled with the machine's current home shop, as its units are (machinesCarrying): a machine that moved
      -- keeps the failures of its earlier home shops in its life
      FROM ${failureRelation(scope, ff, "current")} fr
      JOIN fact_repair_line p ON p.repair_line_key = fr.repair_line_key
      WHERE fr.hour_meter IS NOT NULL
    ), units AS (
      SELECT m.machine_key, m.engine_family, m.model_line, m.shop_code, m.climate_zone, m.build_month,
             coalesce(prev.hour_meter, m.install_h) AS start_h,
             coalesce(cur.hour_meter, m.last_h) AS end_h,
             CASE WHEN cur.k IS NULL THEN 0 ELSE 1 END AS event,
             CASE WHEN prev.k IS NULL THEN m.build_lot ELSE prev.fitted_lot END AS lot,
             CASE WHEN prev.k IS NULL AND m.first_d > m.delivery_date + 30 THEN greatest(m.first_h - m.install_h, 0) ELSE 0 END AS entry_h,
             cur.repair_line_key
      FROM mach m
      LEFT JOIN (SELECT machine_key, max(k) AS n FROM fails GROUP BY 1) c ON c.machine_key = m.machine_key
      CROSS JOIN LATERAL generate_series(1, coalesce(c.n, 0) + 1) AS seq(k)
      LEFT JOIN fails cur ON cur.machine_key = m.machine_key AND cur.k = seq.k
      LEFT JOIN fails prev ON prev.machine_key = m.machine_key AND prev.k = seq.k - 1
    )
    SELECT u.machine_key, u.start_h, u.end_h, u.entry_h, u.event, u.lot, u.shop_code, u.climate_zone, u.engine_family,
           u.model_line, to_char(u.build_month, 'YYYY-MM') AS build_month, u.repair_line_key
    FROM units u
    WHERE u.end_h > u.start_h AND ${cohortConditions("u", scope, unitFilter)}
    ORDER BY u.machine_key, u.start_h -- a fixed order, so sums over units come out the same to the last digit
  `);
  return res.rows
    .map((r) => ({
      machineKey: String(r.machine_key),
      time: Number(r.end_h) - Number(r.start_h),
      entry: Number(r.entry_h),
      event: (Number(r.event) === 1 ? 1 : 0) as 0 | 1,
      lot: r.lot,
      shopCode: r.shop_code,
      climateZone: r.climate_zone,
      engineFamily: r.engine_family,
      modelLine: r.model_line,
      buildMonth: r.build_month,
      repairLineKey: r.repair_line_key === null ? null : String(r.repair_line_key),
    }))
    .filter((u) => u.entry < u.time);
}

export interface RecurrenceRow {
  machineKey: string;
  ages: number[];
  startAge: number;
  endAge: number;
  lot: string;
  shopCode: string;
  climateZone: string | null;
  engineFamily: string;
}

/**
 * Repairs of one component per machine for the mean cumulative function: every failure line counts,
 * repeat visits included; ages are engine hours since delivery, observation runs from the first to the
 * last valid reading. Machines of the families that carry the component, with no repair, count as
 * observed with zero repairs.
 */
export async function recurrences(db: Db, scope: ShopScope, f: AnalyticsFilters, component: string): Promise<RecurrenceRow[]> {
  const unitFilter: AnalyticsFilters = { ...f, tempBands: [], hourBands: [], lots: [] };
  const res = await analyticsRead(db, sql<{
    machine_key: string; ages: number[] | null; start_age: number; end_age: number; lot: string; shop_code: string;
    climate_zone: string | null; engine_family: string;
  }>`
    WITH mach AS ${machinesCarrying(component, scope, unitFilter)}
    SELECT m.machine_key, m.build_lot AS lot, m.shop_code, m.climate_zone, m.engine_family,
           greatest(m.first_h - m.install_h, 0) AS start_age, m.last_h - m.install_h AS end_age,
           (SELECT array_agg(fl.hour_meter::double precision - m.install_h ORDER BY fl.hour_meter)
              FROM fact_repair_line fl JOIN dim_component c ON c.component_key = fl.component_key
             WHERE fl.machine_key = m.machine_key AND c.component_code = ${component} AND fl.line_type = 'failure'
               AND fl.hour_meter IS NOT NULL
               ${f.from ? sql`AND fl.opened_date >= ${f.from}::date` : sql``}
               ${f.to ? sql`AND fl.opened_date <= ${f.to}::date` : sql``}) AS ages
    FROM mach m
    WHERE m.last_h > m.install_h
    ORDER BY m.machine_key -- a fixed order, so sums over machines come out the same to the last digit
  `);
  return res.rows
    .filter((r) => Number(r.end_age) > Number(r.start_age)) // a machine seen at one age only has no observation window
    .map((r) => {
    const start = Number(r.start_age);
    const end = Number(r.end_age);
    return {
      machineKey: String(r.machine_key),
      ages: (r.ages ?? []).map(Number).filter((a) => a > start && a <= end),
      startAge: start,
      endAge: end,
      lot: r.lot,
      shopCode: r.shop_code,
      climateZone: r.climate_zone,
      engineFamily: r.engine_family,
    };
  });
}

export interface CostRecurrenceRow extends RecurrenceRow {
  /** parts + labour cost of each repair, in the order of `ages` (a missing cost counts as 0) */
  costs: number[];
}

/**
 * {@link recurrences} with each repair's cost (parts_cost + labor_cost of the failure line), for the cost mean
 * cumulative function: the same machines, observation windows and repairs.
 */
export async function costRecurrences(db: Db, scope: ShopScope, f: AnalyticsFilters, component: string): Promise<CostRecurrenceRow[]> {
  const unitFilter: AnalyticsFilters = { ...f, tempBands: [], hourBands: [], lots: [] };
  const res = await analyticsRead(db, sql<{
    machine_key: string; repairs: { age: number; cost: number }[] | null; start_age: number; end_age: number; lot: string;
    shop_code: string; climate_zone: string | null; engine_family: string;
  }>`
    WITH mach AS ${machinesCarrying(component, scope, unitFilter)}
    SELECT m.machine_key, m.build_lot AS lot, m.shop_code, m.climate_zone, m.engine_family,
           greatest(m.first_h - m.install_h, 0) AS start_age, m.last_h - m.install_h AS end_age,
           (SELECT json_agg(json_build_object(
                     'age', fl.hour_meter::double precision - m.install_h,
                     'cost', coalesce(fl.parts_cost, 0)::double precision + coalesce(fl.labor_cost, 0)::double precision)
                   ORDER BY fl.hour_meter, fl.repair_line_key)
              FROM fact_repair_line fl JOIN dim_component c ON c.component_key = fl.component_key
             WHERE fl.machine_key = m.machine_key AND c.component_code = ${component} AND fl.line_type = 'failure'
               AND fl.hour_meter IS NOT NULL
               ${f.from ? sql`AND fl.opened_date >= ${f.from}::date` : sql``}
               ${f.to ? sql`AND fl.opened_date <= ${f.to}::date` : sql``}) AS repairs
    FROM mach m
    WHERE m.last_h > m.install_h
    ORDER BY m.machine_key -- a fixed order, so sums over machines come out the same to the last digit
  `);
  return res.rows
    .filter((r) => Number(r.end_age) > Number(r.start_age))
    .map((r) => {
      const start = Number(r.start_age);
      const end = Number(r.end_age);
      const kept = (r.repairs ?? []).map((x) => ({ age: Number(x.age), cost: Math.max(0, Number(x.cost)) })).filter((x) => x.age > start && x.age <= end);
      return {
        machineKey: String(r.machine_key),
        ages: kept.map((x) => x.age),
        costs: kept.map((x) => x.cost),
        startAge: start,
        endAge: end,
        lot: r.lot,
        shopCode: r.shop_code,
        climateZone: r.climate_zone,
        engineFamily: r.engine_family,
      };
    });
}
