import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { analyticsRead, cohortConditions, exposureRelation } from "./analytics-base.js";

export interface ShopComponentCost {
  shop: string;
  component: string;
  lines: number;
  partsCost: number;
  labourCost: number;
}

export interface CostsAndExposure {
  rows: ShopComponentCost[];
  /** engine hours of the filtered fleet by home shop */
  hoursByShop: Map<string, number>;
}

/** The filters costs honour: the band and lot filters label failures by their day, not repair spend, so they are set aside. */
export const costFilters = (f: AnalyticsFilters): AnalyticsFilters => ({ ...f, tempBands: [], hourBands: [], lots: [] });

/**
 * Parts and labour cost of every failure line (comeback visits included: they are spent too), by the machine's
 * home shop on the day the order opened (machine_home_shop, as the exposure counts it) and component; beside
 * it, the engine hours of the same fleet by shop. Missing costs count as 0. Lines of machines outside the
 * caller's scope or the filters are left out by the same cohort conditions the exposure uses.
 */
export async function costsByShopAndComponent(db: Db, scope: ShopScope, filters: AnalyticsFilters): Promise<CostsAndExposure> {
  const f = costFilters(filters);
  const window = [sql`fl.line_type = 'failure'`];
  if (f.from) window.push(sql`fl.opened_date >= ${f.from}::date`);
  if (f.to) window.push(sql`fl.opened_date <= ${f.to}::date`);
  if (f.components.length) window.push(sql`c.component_code IN (${sql.join(f.components.map((code) => sql`${code}`))})`);
  const [costs, hours] = await Promise.all([
    analyticsRead(db, sql<{ shop_code: string; component_code: string; lines: string; parts: number | null; labour: number | null }>`
      SELECT y.shop_code, y.component_code, count(*)::bigint AS lines,
             sum(y.parts_cost)::double precision AS parts, sum(y.labor_cost)::double precision AS labour
      FROM (
        SELECT s.shop_code, c.component_code, m.engine_family, m.model_line,
               date_trunc('month', coalesce(m.build_date, m.delivery_date))::date AS build_month,
               coalesce(fl.parts_cost, 0) AS parts_cost, coalesce(fl.labor_cost, 0) AS labor_cost
        FROM fact_repair_line fl
        JOIN dim_component c ON c.component_key = fl.component_key
        JOIN dim_machine m ON m.machine_key = fl.machine_key
        JOIN machine_home_shop hs ON hs.machine_key = fl.machine_key AND hs.valid_from <= fl.opened_date
          AND (hs.valid_to IS NULL OR hs.valid_to > fl.opened_date)
        JOIN dim_shop s ON s.shop_key = hs.shop_key
        WHERE ${sql.join(window, sql` AND `)}
      ) y
      WHERE ${cohortConditions("y", scope, f)}
      GROUP BY 1, 2
      ORDER BY 1, 2
    `),
    analyticsRead(db, sql<{ shop_code: string; engine_hours: number | null }>`
      SELECT ex.shop_code, sum(ex.engine_hours)::double precision AS engine_hours FROM ${exposureRelation(scope, f)} ex GROUP BY 1 ORDER BY 1
    `),
  ]);
  return {
    rows: costs.rows.map((r) => ({
      shop: r.shop_code,
      component: r.component_code,
      lines: Number(r.lines),
      partsCost: Number(r.parts ?? 0),
      labourCost: Number(r.labour ?? 0),
    })),
    hoursByShop: new Map(hours.rows.map((r) => [r.shop_code, Number(r.engine_hours ?? 0)])),
  };
}
