import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ClaimCandidateQuery } from "../../../shared/schemas/claims.js";
import { scopedShopCodes } from "./scope.js";

export interface CoverDefaults {
  baseMonths: number;
  baseHours: number;
  engineMonths: number;
  engineHours: number;
}

export interface QueueRow {
  key: string;
  claim_days: number;
  total: string;
}

/**
 * The machine's cover for the line's component class, in SQL: registry terms, else the current warranty policy
 * version of the machine's engine family (`p`, from policyOf), else the defaults given.
 */
function insideCover(d: CoverDefaults): RawBuilder<unknown> {
  return sql`fl.opened_date <= (m.delivery_date + make_interval(months => CASE WHEN c.system = 'Engine'
            THEN coalesce(m.warranty_engine_months, p.engine_months, ${d.engineMonths}) ELSE coalesce(m.warranty_base_months, p.base_months, ${d.baseMonths}) END))::date
      AND fl.hour_meter <= CASE WHEN c.system = 'Engine'
            THEN coalesce(m.warranty_engine_hours, p.engine_hours, ${d.engineHours}) ELSE coalesce(m.warranty_base_hours, p.base_hours, ${d.baseHours}) END`;
}

/**
 * The current policy version of the machine's engine family, or the group default ('*'), as `p`: the highest
 * saved version (warranty_policy_version, migration 0063).
 */
const policyOf = sql`LEFT JOIN LATERAL (
        SELECT v.claim_days, v.base_months, v.base_hours, v.engine_months, v.engine_hours FROM warranty_policy_version v
        WHERE v.engine_family IN (m.engine_family, '*')
        ORDER BY (v.engine_family = '*'), v.version DESC LIMIT 1
      ) p ON TRUE`;

const scopeCondition = (scope: ShopScope): RawBuilder<unknown> => {
  const shops = scopedShopCodes(scope);
  return shops ? (shops.length ? sql`s.shop_code IN (${sql.join(shops.map((x) => sql`${x}`))})` : sql`FALSE`) : sql`TRUE`;
};

/** A serial or repair-order number as typed: case and surrounding spaces ignored, a prefix is enough. */
const searchCondition = (q: string): RawBuilder<unknown> => {
  const like = `${q.trim().toUpperCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  return sql`(upper(m.serial) LIKE ${like} OR upper(fl.ro_number) LIKE ${like})`;
};

/**
 * One page of the clerk's queue: closed failure lines inside their machine's cover that no repair claim holds,
 * filtered (shop, component, engine family, at most `daysLeft` days left to file, a serial or RO number) and sorted
 * on the server. A line's deadline is its close + its engine family's filing window (the current warranty
 * policy version; '*' for the rest). Sorting by deadline puts the lines that can still be filed first, nearest first, then the overdue
 * ones, least overdue first. Returns the page's keys with their filing window and the total.
 */
export async function claimQueuePage(db: Db, scope: ShopScope, d: CoverDefaults, q: ClaimCandidateQuery, today: string): Promise<{ rows: QueueRow[]; total: number }> {
  const conds: RawBuilder<unknown>[] = [scopeCondition(scope)];
  if (q.shop) conds.push(sql`s.shop_code = ${q.shop.toUpperCase()}`);
  if (q.component) conds.push(sql`c.component_code = ${q.component}`);
  if (q.engineFamily) conds.push(sql`m.engine_family = ${q.engineFamily}`);
  if (q.q) conds.push(searchCondition(q.q));
  const dirSql = sql.raw(q.dir === "desc" ? "DESC" : "ASC");
  const order: Record<ClaimCandidateQuery["sort"], RawBuilder<unknown>> = {
    deadline:
      q.dir === "asc"
        ? sql`(x.deadline < ${today}::date), CASE WHEN x.deadline >= ${today}::date THEN x.deadline END ASC, x.deadline DESC`
        : sql`x.deadline DESC`,
    closed: sql`x.closed_date ${dirSql}`,
    serial: sql`x.serial ${dirSql}`,
    shop: sql`x.shop_code ${dirSql}`,
    component: sql`x.component_name ${dirSql}`,
    amount: sql`x.amount ${dirSql} NULLS LAST`,
  };
  const res = await sql<QueueRow>`
    WITH x AS (
      SELECT fl.repair_line_key, fl.closed_date, m.serial, s.shop_code, c.name AS component_name,
             coalesce(fl.parts_cost, 0) + coalesce(fl.labor_cost, 0) AS amount, p.claim_days,
             fl.closed_date + p.claim_days AS deadline
      FROM fact_repair_line fl
      JOIN dim_shop s ON s.shop_key = fl.shop_key
      JOIN dim_machine m ON m.machine_key = fl.machine_key
      JOIN dim_component c ON c.component_key = fl.component_key
      ${policyOf}
      WHERE fl.line_type = 'failure' AND fl.closed_date IS NOT NULL AND fl.hour_meter IS NOT NULL AND m.delivery_date IS NOT NULL
        AND ${insideCover(d)} AND ${sql.join(conds, sql` AND `)}
        AND NOT EXISTS (
          SELECT 1 FROM warranty_claim_line w JOIN warranty_claim wc ON wc.claim_id = w.claim_id
          WHERE w.repair_line_key = fl.repair_line_key AND wc.kind = 'repair')
    )
    SELECT x.repair_line_key::text AS key, x.claim_days, count(*) OVER () AS total
    FROM x
    WHERE ${q.daysLeft === undefined ? sql`TRUE` : sql`x.deadline - ${today}::date <= ${q.daysLeft}`}
    ORDER BY ${order[q.sort]}, x.repair_line_key
    LIMIT ${q.pageSize} OFFSET ${(q.page - 1) * q.pageSize}`.execute(db);
  return { rows: res.rows, total: res.rows.length ? Number(res.rows[0].total) : await countOnly(db, scope, d, q, today) };
}

/** The total when the page asked for lies past the end (no row to carry it). */
async function countOnly(db: Db, scope: ShopScope, d: CoverDefaults, q: ClaimCandidateQuery, today: string): Promise<number> {
  if (q.page === 1) return 0;
  const first = await claimQueuePage(db, scope, d, { ...q, page: 1, pageSize: 1 }, today);
  return first.total;
}

/**
 * Failure lines a serial or RO number names that are not in the queue, with why in words: a claim holds them,
 * the repair order is open, or the failure is outside the machine's cover. At most `limit` of them.
 */
export async function linesOutsideQueue(db: Db, scope: ShopScope, d: CoverDefaults, text: string, limit = 5) {
  const res = await sql<{ key: string; ro_number: string; line_no: number; serial: string; shop_code: string; component: string; claim_number: string | null; open: boolean; covered: boolean }>`
    SELECT fl.repair_line_key::text AS key, fl.ro_number, fl.line_no, m.serial, s.shop_code, c.name AS component,
           (SELECT wc.claim_number FROM warranty_claim_line w JOIN warranty_claim wc ON wc.claim_id = w.claim_id
             WHERE w.repair_line_key = fl.repair_line_key AND wc.kind = 'repair' LIMIT 1) AS claim_number,
           fl.closed_date IS NULL AS open,
           coalesce(fl.hour_meter IS NOT NULL AND m.delivery_date IS NOT NULL AND ${insideCover(d)}, false) AS covered
    FROM fact_repair_line fl
    JOIN dim_shop s ON s.shop_key = fl.shop_key
    JOIN dim_machine m ON m.machine_key = fl.machine_key
    JOIN dim_component c ON c.component_key = fl.component_key
    ${policyOf}
    WHERE fl.line_type = 'failure' AND ${scopeCondition(scope)} AND ${searchCondition(text)}
    ORDER BY fl.opened_date DESC, fl.repair_line_key
    LIMIT 200`.execute(db);
  return res.rows
    .filter((r) => r.claim_number !== null || r.open || !r.covered)
    .slice(0, limit)
    .map((r) => ({
      repairLineId: r.key,
      roNumber: r.ro_number,
      lineNo: r.line_no,
      serial: r.serial,
      shopCode: r.shop_code,
      component: r.component,
      why: r.claim_number ? `claim ${r.claim_number} already holds it` : r.open ? "the repair order is still open" : "the failure is outside the machine's cover (months or hours)",
    }));
}
