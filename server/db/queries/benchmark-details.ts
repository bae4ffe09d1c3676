import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { LineKpi } from "../../../shared/schemas/benchmark-details.js";
import type { WaitRow } from "../../analytics/benchmark-waits.js";
import type { CycleLine } from "../../analytics/benchmark-fix.js";
import { scopedShopCodes } from "./scope.js";

// The lines behind the benchmark figures. Line reads (kpiLines, claimLines) take the caller's scope and return
// nothing for a shop outside it; the group reads (waitRows, cycleLines, returnForPartsLines) return counts, dates
// and keys per shop code only, because the group's figure needs every shop, and the service shows a caller only
// the shops in their scope.

const inScope = (scope: ShopScope): RawBuilder<boolean> => {
  const codes = scopedShopCodes(scope);
  if (codes === null) return sql<boolean>`true`;
  if (codes.length === 0) return sql<boolean>`false`;
  return sql<boolean>`(s.shop_code IN (${sql.join(codes)}))`;
};

export interface KpiLineRow {
  roNumber: string;
  lineNo: number;
  opened: string;
  closed: string | null;
  technician: string | null;
  techId: string | null;
  component: string;
  laborOp: string | null;
  standardHours: number | null;
  actualHours: number | null;
  partNumber: string | null;
  ordered: string | null;
  received: string | null;
  waitDays: number | null;
  backOrdered: boolean;
  readings: number;
}

/** The filter of each KPI's lines: the same conditions as the sums of monthlyTotals and partsWaitCounts. */
const KPI_WHERE: Record<Exclude<LineKpi, "claims">, RawBuilder<boolean>> = {
  efficiency: sql<boolean>`f.standard_hours > 0 AND f.labor_hours >= 0`,
  partsWait: sql<boolean>`f.parts_wait_days IS NOT NULL AND f.parts_wait_days >= 0`,
  backOrder: sql<boolean>`f.part_ordered_date IS NOT NULL`,
  coldStart: sql<boolean>`f.line_type = 'failure' AND c.cold_start_aid`,
};

/**
 * One shop's lines behind a KPI, closed from `from` to `through` (both inclusive), optionally of one technician;
 * none when the shop is outside the scope.
 */
export async function kpiLines(
  db: Db,
  scope: ShopScope,
  kpi: Exclude<LineKpi, "claims">,
  shop: string,
  from: string,
  through: string,
  technician: string | undefined,
): Promise<KpiLineRow[]> {
  const r = await sql<{
    ro_number: string; line_no: number; opened: string; closed: string | null; tech: string | null; tech_id: string | null; component: string;
    labor_op: string | null; std: string | null; act: string | null; part_number: string | null; ordered: string | null; received: string | null;
    wait: number | null; back_ordered: boolean; readings: string;
  }>`
    SELECT f.ro_number, f.line_no, f.opened_date::text AS opened, f.closed_date::text AS closed,
           CASE WHEN t.tech_id IS NULL THEN NULL ELSE t.tech_id || ' ' || t.display_name END AS tech, t.tech_id,
           c.name AS component, f.labor_op, f.standard_hours AS std, f.labor_hours AS act, f.part_number,
           f.part_ordered_date::text AS ordered, f.part_received_date::text AS received, f.parts_wait_days AS wait, f.back_ordered,
           (SELECT count(*) FROM fact_measurement m WHERE m.repair_line_key = f.repair_line_key) AS readings
    FROM fact_repair_line f
    JOIN dim_shop s ON s.shop_key = f.shop_key
    JOIN dim_component c ON c.component_key = f.component_key
    LEFT JOIN dim_technician t ON t.technician_key = f.technician_key
    WHERE s.shop_code = ${shop} AND ${inScope(scope)} AND ${KPI_WHERE[kpi]}
      AND f.closed_date IS NOT NULL AND f.closed_date >= ${from}::date AND f.closed_date <= ${through}::date
      ${technician === undefined ? sql`` : sql`AND t.tech_id = ${technician}`}
    ORDER BY f.closed_date, f.ro_number, f.line_no
  `.execute(db);
  const num = (x: string | null) => (x === null ? null : Number(x));
  return r.rows.map((x) => ({
    roNumber: x.ro_number, lineNo: x.line_no, opened: x.opened, closed: x.closed, technician: x.tech, techId: x.tech_id, component: x.component,
    laborOp: x.labor_op, standardHours: num(x.std), actualHours: num(x.act), partNumber: x.part_number, ordered: x.ordered, received: x.received,
    waitDays: x.wait, backOrdered: x.back_ordered, readings: Number(x.readings),
  }));
}

export interface ClaimLineRow {
  claimNumber: string;
  roNumber: string | null;
  closed: string;
  deadline: string;
  filed: string | null;
  onTime: boolean;
}

/**
 * One shop's repair claims whose filing is decided by `today`, by RO close from `from` to `to`: the same claims
 * and the same on-time rule as warrantyClaimCounts. None when the shop is outside the scope.
 */
export async function claimLines(db: Db, scope: ShopScope, shop: string, from: string, to: string, today: string): Promise<ClaimLineRow[]> {
  const codes = scopedShopCodes(scope);
  if (codes !== null && !codes.includes(shop)) return [];
  const r = await sql<{ claim_number: string; ro_number: string | null; closed: string; deadline: string; filed: string | null; on_time: boolean }>`
    SELECT w.claim_number, (SELECT min(f.ro_number) FROM warranty_claim_line wl JOIN fact_repair_line f ON f.repair_line_key = wl.repair_line_key WHERE wl.claim_id = w.claim_id) AS ro_number,
           w.closed_date::text AS closed, w.deadline::text AS deadline,
           (CASE WHEN w.submitted_at IS NULL THEN NULL ELSE coalesce(w.filed_on, (w.submitted_at AT TIME ZONE 'UTC')::date) END)::text AS filed,
           (w.submitted_at IS NOT NULL AND coalesce(w.filed_on, (w.submitted_at AT TIME ZONE 'UTC')::date) <= w.deadline) AS on_time
    FROM warranty_claim w
    WHERE w.kind = 'repair' AND w.revision = 1 AND w.shop_code = ${shop}
      AND (w.submitted_at IS NOT NULL OR w.deadline < ${today}::date)
      AND w.closed_date >= ${from}::date AND w.closed_date <= ${to}::date
    ORDER BY on_time, w.deadline
  `.execute(db);
  return r.rows.map((x) => ({ claimNumber: x.claim_number, roNumber: x.ro_number, closed: x.closed, deadline: x.deadline, filed: x.filed, onTime: x.on_time }));
}

/** Part lines of the whole group, closed by `countedThrough`, grouped by shop, order and close month, wait, back-order and part. */
export async function waitRows(db: Db, countedThrough: string): Promise<WaitRow[]> {
  const r = await sql<{ shop_code: string; order_month: string; close_month: string; days: number; back_ordered: boolean; component: string; family: string | null; lines: string }>`
    SELECT s.shop_code, to_char(f.part_ordered_date, 'YYYY-MM') AS order_month, to_char(f.closed_date, 'YYYY-MM') AS close_month,
           f.parts_wait_days AS days, f.back_ordered, c.name AS component, m.engine_family AS family, count(*) AS lines
    FROM fact_repair_line f
    JOIN dim_shop s ON s.shop_key = f.shop_key
    JOIN dim_component c ON c.component_key = f.component_key
    LEFT JOIN dim_machine m ON m.machine_key = f.machine_key
    WHERE f.parts_wait_days IS NOT NULL AND f.parts_wait_days >= 0 AND f.closed_date <= ${countedThrough}::date
    GROUP BY 1, 2, 3, 4, 5, 6, 7
  `.execute(db);
  return r.rows.map((x) => ({
    shop: x.shop_code, orderMonth: x.order_month, closeMonth: x.close_month, days: Number(x.days), backOrdered: x.back_ordered,
    component: x.component, engineFamily: x.family, lines: Number(x.lines),
  }));
}

/**
 * Keys of the failure lines that needed a return for parts: the part was back-ordered, or the RO holds a
 * return-for-parts line.
 */
export async function returnForPartsLines(db: Db): Promise<Set<string>> {
  const r = await sql<{ id: string }>`
    SELECT f.repair_line_key::text AS id FROM fact_repair_line f
    WHERE f.line_type = 'failure' AND (f.back_ordered OR EXISTS (
      SELECT 1 FROM fact_repair_line x WHERE x.shop_key = f.shop_key AND x.ro_number = f.ro_number AND x.line_type = 'return_for_parts'))
  `.execute(db);
  return new Set(r.rows.map((x) => x.id));
}

export interface CycleRow extends CycleLine {
  shop: string;
  /** the technician of the RO's first line, for shops in the scope only */
  technician: string | null;
}

/** Lines of ROs whose last line closed from `from` to `to`, group-wide; the technician for shops in the scope only. */
export async function cycleLines(db: Db, scope: ShopScope, from: string, to: string): Promise<CycleRow[]> {
  const r = await sql<{ shop_code: string; ro: string; opened: string; closed: string; ordered: string | null; received: string | null; tech: string | null }>`
    WITH ro AS (
      SELECT f.shop_key, f.ro_number, max(f.closed_date) AS closed
      FROM fact_repair_line f GROUP BY 1, 2
      HAVING bool_and(f.closed_date IS NOT NULL) AND max(f.closed_date) >= ${from}::date AND max(f.closed_date) <= ${to}::date
    )
    SELECT s.shop_code, f.ro_number AS ro, f.opened_date::text AS opened, f.closed_date::text AS closed,
           f.part_ordered_date::text AS ordered, f.part_received_date::text AS received,
           CASE WHEN ${inScope(scope)} THEN first_value(t.tech_id) OVER (PARTITION BY f.shop_key, f.ro_number ORDER BY f.line_no) END AS tech
    FROM ro JOIN fact_repair_line f ON f.shop_key = ro.shop_key AND f.ro_number = ro.ro_number
    JOIN dim_shop s ON s.shop_key = f.shop_key
    LEFT JOIN dim_technician t ON t.technician_key = f.technician_key
  `.execute(db);
  return r.rows.map((x) => ({
    shop: x.shop_code, ro: `${x.shop_code}|${x.ro}`, opened: x.opened, closed: x.closed, ordered: x.ordered, received: x.received, technician: x.tech,
  }));
}
