import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { RepairLineRecord } from "../../analytics/comebacks.js";
import type { ClaimCount, MonthlyTotals, WaitCount } from "../../analytics/benchmark-ledger.js";
import { scopedShopCodes } from "./scope.js";

// Benchmarking compares a shop with the rest of the group, so these reads cover every shop by design: a peer's
// rate cannot be computed without the peer's lines. The count queries (monthlyTotals, partsWaitCounts,
// warrantyClaimCounts) return sums per shop code only; the line queries take the caller's scope and return, for a
// shop outside it, pairing fields only (no RO number, no technician, no text). The benchmarks service anonymises
// every shop outside the scope before anything is sent.

const inScopeSql = (scope: ShopScope) => {
  const codes = scopedShopCodes(scope);
  if (codes === null) return sql<boolean>`true`;
  if (codes.length === 0) return sql<boolean>`false`;
  return sql<boolean>`(s.shop_code IN (${sql.join(codes)}))`;
};

export interface DataSpan {
  /** the last date with a repair line anywhere in the group */
  asOf: string | null;
  /** the first month with a closed line */
  firstMonth: string | null;
}

/** The span of repair data in the warehouse, group-wide (the same for every caller). */
export async function dataSpan(db: Db): Promise<DataSpan> {
  const r = await sql<{ as_of: string | null; first_month: string | null }>`
    SELECT max(opened_date)::text AS as_of, to_char(min(closed_date), 'YYYY-MM') AS first_month FROM fact_repair_line
  `.execute(db);
  return { asOf: r.rows[0]?.as_of ?? null, firstMonth: r.rows[0]?.first_month ?? null };
}

export interface ShopEntry {
  code: string;
  name: string;
  town: string | null;
  inScope: boolean;
}

export async function benchmarkShops(db: Db, scope: ShopScope): Promise<ShopEntry[]> {
  const r = await sql<{ shop_code: string; name: string; town: string | null; in_scope: boolean }>`
    SELECT s.shop_code, s.name, s.town, ${inScopeSql(scope)} AS in_scope FROM dim_shop s ORDER BY s.shop_code
  `.execute(db);
  return r.rows.map((x) => ({ code: x.shop_code, name: x.name, town: x.town, inScope: x.in_scope }));
}

/**
 * Failure lines with only the fields the comeback rule needs. The technician is given for shops in the scope
 * only. Customer damage is the failure mode DAMAGE of shared/catalog.ts.
 */
export async function comebackLines(db: Db, scope: ShopScope): Promise<RepairLineRecord[]> {
  const r = await sql<{
    id: string;
    shop: string;
    technician: string | null;
    machine: string;
    system: string;
    damage: boolean;
    opened: string;
    closed: string | null;
    hour_meter: string | null;
  }>`
    SELECT f.repair_line_key::text AS id, s.shop_code AS shop,
           CASE WHEN ${inScopeSql(scope)} THEN t.tech_id END AS technician,
           f.machine_key::text AS machine, c.system, coalesce(fm.failure_mode_code = 'DAMAGE', false) AS damage,
           f.opened_date AS opened, f.closed_date AS closed, f.hour_meter
    FROM fact_repair_line f
    JOIN dim_shop s ON s.shop_key = f.shop_key
    JOIN dim_component c ON c.component_key = f.component_key
    LEFT JOIN dim_failure_mode fm ON fm.failure_mode_key = f.failure_mode_key
    LEFT JOIN dim_technician t ON t.technician_key = f.technician_key
    WHERE f.line_type = 'failure'
  `.execute(db);
  return r.rows.map((x) => ({
    id: x.id,
    shop: x.shop,
    technician: x.technician,
    machine: x.machine,
    system: x.system,
    lineType: "failure",
    customerDamage: x.damage,
    opened: x.opened,
    closed: x.closed,
    hourMeter: x.hour_meter === null ? null : Number(x.hour_meter),
  }));
}

/** Technician display names of the shops in scope, by tech id. */
export async function technicianNames(db: Db, scope: ShopScope): Promise<Map<string, string>> {
  const r = await sql<{ tech_id: string; display_name: string }>`
    SELECT t.tech_id, t.display_name FROM dim_technician t JOIN dim_shop s ON s.shop_key = t.shop_key WHERE ${inScopeSql(scope)}
  `.execute(db);
  return new Map(r.rows.map((x) => [x.tech_id, x.display_name]));
}

/**
 * Per shop and month of close, for lines closed on or before `countedThrough`: labour sums on lines with a
 * standard time and a booked actual time; part lines (a part was ordered) and how many were back-ordered;
 * failure lines on a cold-start aid and how many have at least one measurement recorded.
 */
export async function monthlyTotals(db: Db, countedThrough: string): Promise<MonthlyTotals[]> {
  const r = await sql<{
    shop_code: string;
    month: string;
    eff_lines: string;
    std: string | null;
    act: string | null;
    part_lines: string;
    back_ordered: string;
    cold_jobs: string;
    cold_measured: string;
  }>`
    SELECT s.shop_code, to_char(f.closed_date, 'YYYY-MM') AS month,
           count(*) FILTER (WHERE f.standard_hours > 0 AND f.labor_hours >= 0) AS eff_lines,
           sum(f.standard_hours) FILTER (WHERE f.standard_hours > 0 AND f.labor_hours >= 0) AS std,
           sum(f.labor_hours) FILTER (WHERE f.standard_hours > 0 AND f.labor_hours >= 0) AS act,
           count(*) FILTER (WHERE f.part_ordered_date IS NOT NULL) AS part_lines,
           count(*) FILTER (WHERE f.part_ordered_date IS NOT NULL AND f.back_ordered) AS back_ordered,
           count(*) FILTER (WHERE f.line_type = 'failure' AND c.cold_start_aid) AS cold_jobs,
           count(*) FILTER (WHERE f.line_type = 'failure' AND c.cold_start_aid
                              AND EXISTS (SELECT 1 FROM fact_measurement m WHERE m.repair_line_key = f.repair_line_key)) AS cold_measured
    FROM fact_repair_line f
    JOIN dim_shop s ON s.shop_key = f.shop_key
    JOIN dim_component c ON c.component_key = f.component_key
    WHERE f.closed_date IS NOT NULL AND f.closed_date <= ${countedThrough}::date
    GROUP BY 1, 2
  `.execute(db);
  return r.rows.map((x) => ({
    shop: x.shop_code,
    month: x.month,
    effLines: Number(x.eff_lines),
    standardHours: Number(x.std ?? 0),
    actualHours: Number(x.act ?? 0),
    partLines: Number(x.part_lines),
    backOrdered: Number(x.back_ordered),
    coldStartJobs: Number(x.cold_jobs),
    coldStartMeasured: Number(x.cold_measured),
  }));
}

/** Part lines by days from order to receipt, per shop and month of close (lines closed by `countedThrough`). */
export async function partsWaitCounts(db: Db, countedThrough: string): Promise<WaitCount[]> {
  const r = await sql<{ shop_code: string; month: string; days: number; lines: string }>`
    SELECT s.shop_code, to_char(f.closed_date, 'YYYY-MM') AS month, f.parts_wait_days AS days, count(*) AS lines
    FROM fact_repair_line f JOIN dim_shop s ON s.shop_key = f.shop_key
    WHERE f.parts_wait_days IS NOT NULL AND f.parts_wait_days >= 0 AND f.closed_date <= ${countedThrough}::date
    GROUP BY 1, 2, 3
  `.execute(db);
  return r.rows.map((x) => ({ shop: x.shop_code, month: x.month, days: Number(x.days), lines: Number(x.lines) }));
}

/**
 * Repair claims whose filing is decided by `today` (submitted, or past the deadline without a submission), per
 * shop and month of the RO close; on time = it went out to the maker (the recorded filing date, else the day it was
 * marked submitted) on or before the deadline. A claim corrected after a rejection counts once, by its first filing.
 * Campaign cases (no shop) are left out.
 */
export async function warrantyClaimCounts(db: Db, today: string): Promise<ClaimCount[]> {
  const r = await sql<{ shop_code: string; month: string; claims: string; on_time: string }>`
    SELECT shop_code, to_char(closed_date, 'YYYY-MM') AS month, count(*) AS claims,
           count(*) FILTER (WHERE submitted_at IS NOT NULL AND coalesce(filed_on, (submitted_at AT TIME ZONE 'UTC')::date) <= deadline) AS on_time
    FROM warranty_claim
    WHERE kind = 'repair' AND revision = 1 AND shop_code IS NOT NULL AND (submitted_at IS NOT NULL OR deadline < ${today}::date)
    GROUP BY 1, 2
  `.execute(db);
  return r.rows.map((x) => ({ shop: x.shop_code, month: x.month, claims: Number(x.claims), onTime: Number(x.on_time) }));
}

export interface LineDetail {
  id: string;
  shopCode: string;
  roNumber: string;
  lineNo: number;
  opened: string;
  closed: string | null;
  hourMeter: number | null;
  component: string;
  technician: string | null;
  complaint: string | null;
  cause: string | null;
  correction: string | null;
}

/** The repair-order detail of some lines, only those at shops in the scope (others are simply not returned). */
export async function lineDetails(db: Db, scope: ShopScope, ids: readonly string[]): Promise<Map<string, LineDetail>> {
  if (ids.length === 0) return new Map();
  const r = await sql<{
    id: string;
    shop_code: string;
    ro_number: string;
    line_no: number;
    opened_date: string;
    closed_date: string | null;
    hour_meter: string | null;
    component: string;
    tech: string | null;
    complaint: string | null;
    cause: string | null;
    correction: string | null;
  }>`
    SELECT f.repair_line_key::text AS id, s.shop_code, f.ro_number, f.line_no, f.opened_date, f.closed_date, f.hour_meter,
           c.name AS component, CASE WHEN t.tech_id IS NULL THEN NULL ELSE t.tech_id || ' ' || t.display_name END AS tech,
           f.complaint, f.cause, f.correction
    FROM fact_repair_line f
    JOIN dim_shop s ON s.shop_key = f.shop_key
    JOIN dim_component c ON c.component_key = f.component_key
    LEFT JOIN dim_technician t ON t.technician_key = f.technician_key
    WHERE f.repair_line_key = ANY(${[...ids]}::bigint[]) AND ${inScopeSql(scope)}
  `.execute(db);
  return new Map(
    r.rows.map((x) => [
      x.id,
      {
        id: x.id,
        shopCode: x.shop_code,
        roNumber: x.ro_number,
        lineNo: x.line_no,
        opened: x.opened_date,
        closed: x.closed_date,
        hourMeter: x.hour_meter === null ? null : Number(x.hour_meter),
        component: x.component,
        technician: x.tech,
        complaint: x.complaint,
        cause: x.cause,
        correction: x.correction,
      },
    ]),
  );
}
