import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { scopedShopCodes } from "./scope.js";
import { COMEBACK_DAYS, COMEBACK_HOURS } from "./analytics-base.js";

const shopIn = (col: RawBuilder<unknown>, scope: ShopScope): RawBuilder<unknown> => {
  const codes = scopedShopCodes(scope);
  if (!codes) return sql`TRUE`;
  return codes.length ? sql`${col} IN (${sql.join(codes.map((c) => sql`${c}`))})` : sql`FALSE`;
};

export interface LoadRow {
  /** null for a file that spans the group (machine master, telematics hours) */
  shopCode: string | null;
  batchId: string;
  fileName: string;
  kind: string;
  status: string;
  finishedAt: Date | null;
  rowsRead: number;
  rowsInserted: number;
  rowsUpdated: number;
  rowsUnchanged: number;
  rowsRejected: number;
}

/**
 * The latest batch of each kind for each shop. A batch belongs to a shop by its shop_code, or else by the
 * one shop whose repair lines, measurements or weather it wrote; a file whose rows span several shops
 * (or none) is group-wide and shown only to group-wide roles.
 */
export async function latestLoads(db: Db, scope: ShopScope): Promise<LoadRow[]> {
  const res = await sql<{
    shop_code: string | null; batch_id: string; file_name: string; kind: string; status: string; finished_at: Date | null;
    rows_read: number; rows_inserted: number; rows_updated: number; rows_unchanged: number; rows_rejected: number;
  }>`
    WITH written AS (
      SELECT batch_id, shop_key FROM fact_repair_line GROUP BY 1, 2
      UNION SELECT first_batch_id, shop_key FROM fact_repair_line GROUP BY 1, 2
      UNION SELECT batch_id, shop_key FROM fact_measurement GROUP BY 1, 2
      UNION SELECT batch_id, shop_key FROM fact_weather_day GROUP BY 1, 2
    ), owner AS (
      SELECT w.batch_id, min(s.shop_code) AS shop_code FROM written w JOIN dim_shop s ON s.shop_key = w.shop_key
      GROUP BY 1 HAVING count(DISTINCT w.shop_key) = 1
    ), labelled AS (
      SELECT b.*, coalesce(b.shop_code, o.shop_code) AS owner_shop FROM etl_batch b LEFT JOIN owner o ON o.batch_id = b.batch_id
      WHERE b.status <> 'running'
    )
    SELECT DISTINCT ON (owner_shop, kind) owner_shop AS shop_code, batch_id::text AS batch_id, file_name, kind, status, finished_at,
           rows_read, rows_inserted, rows_updated, rows_unchanged, rows_rejected
    FROM labelled
    WHERE ${scopedShopCodes(scope) ? sql`owner_shop IS NOT NULL AND ${shopIn(sql.ref("owner_shop"), scope)}` : sql`TRUE`}
    ORDER BY owner_shop, kind, started_at DESC, batch_id DESC
  `.execute(db);
  return res.rows.map((r) => ({
    shopCode: r.shop_code,
    batchId: r.batch_id,
    fileName: r.file_name,
    kind: r.kind,
    status: r.status,
    finishedAt: r.finished_at,
    rowsRead: r.rows_read,
    rowsInserted: r.rows_inserted,
    rowsUpdated: r.rows_updated,
    rowsUnchanged: r.rows_unchanged,
    rowsRejected: r.rows_rejected,
  }));
}

/** The last month with exposure in the caller's scope ('YYYY-MM'), or null when there is none. */
export async function lastExposureMonth(db: Db, scope: ShopScope): Promise<string | null> {
  const res = await sql<{ m: string | null }>`
    SELECT to_char(max(e.month), 'YYYY-MM') AS m FROM agg_exposure e JOIN dim_shop s ON s.shop_key = e.shop_key
    WHERE e.machine_days > 0 AND ${shopIn(sql.ref("s.shop_code"), scope)}
  `.execute(db);
  return res.rows[0]?.m ?? null;
}

export interface AttentionRow {
  serial: string;
  modelLine: string;
  engineFamily: string;
  homeShop: string | null;
  failures: number;
  comebacks: number;
  repeatComponents: string[];
  lastOpened: string;
  lastRepairId: string;
  score: number;
}

/**
 * Machines most in need of attention over the 365 days up to the latest repair order in scope:
 * score = failure visits + 2 × comebacks (a failure line opened within COMEBACK_DAYS and COMEBACK_HOURS of an
 * earlier line's close on the same machine and component) + 3 × components with three or more visits
 * (a repeat repair). Ties go to the most recent visit. Lines are those the caller's shops wrote.
 */
export async function machinesNeedingAttention(db: Db, scope: ShopScope, limit = 10): Promise<{ windowEnd: string | null; rows: AttentionRow[] }> {
  const res = await sql<{
    window_end: string; serial: string; model_line: string; engine_family: string; home_shop: string | null; failures: string;
    comebacks: string; repeat_components: string[] | null; last_opened: string; last_id: string; score: string;
  }>`
    WITH scoped AS (
      SELECT fl.* FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key WHERE ${shopIn(sql.ref("s.shop_code"), scope)}
    ), anchor AS (SELECT max(opened_date) AS d FROM scoped),
    lines AS (
      SELECT l.repair_line_key, l.machine_key, l.component_key, l.opened_date, l.hour_meter,
             EXISTS (
               SELECT 1 FROM fact_repair_line p
               WHERE p.machine_key = l.machine_key AND p.component_key = l.component_key AND p.repair_line_key <> l.repair_line_key
                 AND p.opened_date < l.opened_date
                 AND l.opened_date <= coalesce(p.closed_date, p.opened_date) + ${COMEBACK_DAYS}::integer
                 AND (l.hour_meter IS NULL OR p.hour_meter IS NULL OR l.hour_meter - p.hour_meter <= ${COMEBACK_HOURS}::numeric)
             ) AS comeback
      FROM scoped l, anchor
      WHERE l.line_type = 'failure' AND l.opened_date > anchor.d - 365
    ), per_component AS (
      SELECT machine_key, component_key, count(*) AS visits FROM lines GROUP BY 1, 2
    ), per_machine AS (
      SELECT l.machine_key, count(*) AS failures, count(*) FILTER (WHERE l.comeback) AS comebacks, max(l.opened_date) AS last_opened,
             (array_agg(l.repair_line_key::text ORDER BY l.opened_date DESC))[1] AS last_id
      FROM lines l GROUP BY 1
    )
    SELECT (SELECT to_char(d, 'YYYY-MM-DD') FROM anchor) AS window_end, m.serial, m.model_line, m.engine_family, hs.shop_code AS home_shop,
           pm.failures, pm.comebacks, pm.last_opened, pm.last_id,
           (SELECT array_agg(c.name ORDER BY c.name) FROM per_component pc JOIN dim_component c ON c.component_key = pc.component_key
             WHERE pc.machine_key = pm.machine_key AND pc.visits >= 3) AS repeat_components,
           pm.failures + 2 * pm.comebacks
             + 3 * (SELECT count(*) FROM per_component pc WHERE pc.machine_key = pm.machine_key AND pc.visits >= 3) AS score
    FROM per_machine pm
    JOIN dim_machine m ON m.machine_key = pm.machine_key
    LEFT JOIN dim_shop hs ON hs.shop_key = m.home_shop_key
    ORDER BY score DESC, pm.last_opened DESC, m.serial
    LIMIT ${limit}
  `.execute(db);
  const windowEnd = res.rows[0]?.window_end ?? null;
  return {
    windowEnd,
    rows: res.rows.map((r) => ({
      serial: r.serial,
      modelLine: r.model_line,
      engineFamily: r.engine_family,
      homeShop: r.home_shop,
      failures: Number(r.failures),
      comebacks: Number(r.comebacks),
      repeatComponents: r.repeat_components ?? [],
      lastOpened: r.last_opened,
      lastRepairId: r.last_id,
      score: Number(r.score),
    })),
  };
}

export interface VisitRecord {
  lastRequestAt: Date;
  currentClusterIds: string[];
  previousVisitAt: Date | null;
  previousClusterIds: string[] | null;
}

/** A pause this long between two Overview requests starts a new visit. */
export const VISIT_GAP_MINUTES = 30;

/**
 * Records an Overview request and returns the baseline to compare with: the clusters shown at the end of
 * the previous visit and when that was (null on a first visit). Within one visit the baseline stays put,
 * so a reload does not make the "new" clusters disappear.
 */
export async function recordVisit(db: Db, sub: string, clusterIds: string[], now = new Date()): Promise<{ previousVisitAt: Date | null; previousClusterIds: string[] | null }> {
  return await db.transaction().execute(async (trx) => {
    const row = await trx.selectFrom("app_user_visit").selectAll().where("sub", "=", sub).forUpdate().executeTakeFirst();
    if (!row) {
      await trx.insertInto("app_user_visit").values({ sub, last_request_at: now, current_cluster_ids: clusterIds, previous_visit_at: null, previous_cluster_ids: null }).execute();
      return { previousVisitAt: null, previousClusterIds: null };
    }
    const newVisit = now.getTime() - row.last_request_at.getTime() > VISIT_GAP_MINUTES * 60_000;
    const previousVisitAt = newVisit ? row.last_request_at : row.previous_visit_at;
    const previousClusterIds = newVisit ? row.current_cluster_ids : row.previous_cluster_ids;
    await trx
      .updateTable("app_user_visit")
      .set({ last_request_at: now, current_cluster_ids: clusterIds, previous_visit_at: previousVisitAt, previous_cluster_ids: previousClusterIds })
      .where("sub", "=", sub)
      .execute();
    return { previousVisitAt, previousClusterIds };
  });
}
