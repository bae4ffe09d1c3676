import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { scopedShopCodes } from "./scope.js";
import { analyticsRead, COMEBACK_DAYS, COMEBACK_HOURS } from "./analytics-base.js";

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

/** The lowest or highest shop key among the rows batch `b` wrote (repair lines, measurements, weather), or null. */
const writtenShop = (fn: "min" | "max", b: RawBuilder<unknown>): RawBuilder<unknown> => {
  const pick = sql.raw(fn === "min" ? "least" : "greatest");
  const agg = sql.raw(fn);
  return sql`${pick}(
    (SELECT ${agg}(shop_key) FROM fact_repair_line WHERE first_batch_id = ${b}),
    (SELECT ${agg}(shop_key) FROM fact_repair_line WHERE batch_id = ${b} AND batch_id <> first_batch_id),
    (SELECT ${agg}(shop_key) FROM fact_measurement WHERE batch_id = ${b}),
    (SELECT ${agg}(shop_key) FROM fact_weather_day WHERE batch_id = ${b})
  )`;
};

/**
 * The latest batch of each kind for each shop. A batch belongs to a shop by its shop_code, or else by the
 * one shop whose repair lines, measurements or weather it wrote; a file whose rows span several shops
 * (or none) is group-wide and shown only to group-wide roles. Which shops a batch wrote is read from the
 * (batch, shop) indexes of migration 0051: the batch wrote one shop when its lowest and highest shop agree.
 */
export async function latestLoads(db: Db, scope: ShopScope): Promise<LoadRow[]> {
  const b = sql.ref("b.batch_id");
  const res = await sql<{
    shop_code: string | null; batch_id: string; file_name: string; kind: string; status: string; finished_at: Date | null;
    rows_read: number; rows_inserted: number; rows_updated: number; rows_unchanged: number; rows_rejected: number;
  }>`
    WITH labelled AS (
      SELECT b.*, coalesce(b.shop_code, (
               SELECT s.shop_code FROM (SELECT ${writtenShop("min", b)} AS lo, ${writtenShop("max", b)} AS hi) w
               JOIN dim_shop s ON s.shop_key = w.lo WHERE w.lo = w.hi
             )) AS owner_shop
      FROM etl_batch b
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

/**
 * The last month with exposure in the caller's scope ('YYYY-MM'), or null when there is none. Read from
 * agg_exposure_fleet, agg_exposure summed over build month and lot (a month has machine-days in one exactly
 * when it has them in the other), which is a small fraction of its size.
 */
export async function lastExposureMonth(db: Db, scope: ShopScope): Promise<string | null> {
  const res = await sql<{ m: string | null }>`
    SELECT to_char(max(e.month), 'YYYY-MM') AS m FROM agg_exposure_fleet e JOIN dim_shop s ON s.shop_key = e.shop_key
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
 * The latest order is each scoped shop's last opening date (one index look-up per shop); the window's
 * failure lines come from the partial failure index, and repeat components are counted once per machine
 * by a grouping joined to the machines rather than looked up machine by machine.
 */
export async function machinesNeedingAttention(db: Db, scope: ShopScope, limit = 10): Promise<{ windowEnd: string | null; rows: AttentionRow[] }> {
  const res = await analyticsRead(db, sql<{
    window_end: string; serial: string; model_line: string; engine_family: string; home_shop: string | null; failures: string;
    comebacks: string; repeat_components: string[] | null; last_opened: string; last_id: string; score: string;
  }>`
    WITH shops AS (SELECT shop_key FROM dim_shop s WHERE ${shopIn(sql.ref("s.shop_code"), scope)}),
    anchor AS (
      SELECT max(last.d) AS d FROM shops
      CROSS JOIN LATERAL (SELECT max(fl.opened_date) AS d FROM fact_repair_line fl WHERE fl.shop_key = shops.shop_key) last
    ),
    lines AS (
      SELECT l.repair_line_key, l.machine_key, l.component_key, l.opened_date,
             EXISTS (
               SELECT 1 FROM fact_repair_line p
               WHERE p.component_key = l.component_key AND p.machine_key = l.machine_key AND p.repair_line_key <> l.repair_line_key
                 AND p.opened_date < l.opened_date
                 AND l.opened_date <= coalesce(p.closed_date, p.opened_date) + ${COMEBACK_DAYS}::integer
                 AND (l.hour_meter IS NULL OR p.hour_meter IS NULL OR l.hour_meter - p.hour_meter <= ${COMEBACK_HOURS}::numeric)
             ) AS comeback
      FROM shops JOIN fact_repair_line l ON l.shop_key = shops.shop_key
      WHERE l.line_type = 'failure' AND l.opened_date > (SELECT d FROM anchor) - 365
    ), repeats AS (
      SELECT pc.machine_key, count(*) AS components,
             array_agg(c.name ORDER BY c.name) FILTER (WHERE c.name IS NOT NULL) AS names
      FROM (SELECT machine_key, component_key FROM lines GROUP BY 1, 2 HAVING count(*) >= 3) pc
      LEFT JOIN dim_component c ON c.component_key = pc.component_key
      GROUP BY 1
    ), per_machine AS (
      SELECT l.machine_key, count(*) AS failures, count(*) FILTER (WHERE l.comeback) AS comebacks, max(l.opened_date) AS last_opened,
             (array_agg(l.repair_line_key::text ORDER BY l.opened_date DESC))[1] AS last_id
      FROM lines l GROUP BY 1
    )
    SELECT (SELECT to_char(d, 'YYYY-MM-DD') FROM anchor) AS window_end, m.serial, m.model_line, m.engine_family, hs.shop_code AS home_shop,
           pm.failures, pm.comebacks, pm.last_opened, pm.last_id, r.names AS repeat_components,
           pm.failures + 2 * pm.comebacks + 3 * coalesce(r.components, 0) AS score
    FROM per_machine pm
    JOIN dim_machine m ON m.machine_key = pm.machine_key
    LEFT JOIN dim_shop hs ON hs.shop_key = m.home_shop_key
    LEFT JOIN repeats r ON r.machine_key = pm.machine_key
    ORDER BY score DESC, pm.last_opened DESC, m.serial
    LIMIT ${limit}
  `);
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
const sameIds = (a: readonly string[] | null, b: readonly string[]) => a !== null && a.length === b.length && a.every((x, i) => x === b[i]);

export async function recordVisit(db: Db, sub: string, clusterIds: string[], now = new Date()): Promise<{ previousVisitAt: Date | null; previousClusterIds: string[] | null }> {
  // a request within a minute of the last one, with the same clusters, changes nothing worth a write: the
  // visit goes on, so the answer is the row's (this keeps a busy page from queueing on the row's lock)
  const recent = await db.selectFrom("app_user_visit").selectAll().where("sub", "=", sub).executeTakeFirst();
  if (
    recent &&
    now.getTime() - recent.last_request_at.getTime() >= 0 &&
    now.getTime() - recent.last_request_at.getTime() < 60_000 &&
    sameIds(recent.current_cluster_ids, clusterIds)
  ) {
    return { previousVisitAt: recent.previous_visit_at, previousClusterIds: recent.previous_cluster_ids };
  }
  return await db.transaction().execute(async (trx) => {
    // a first visit inserts; two first requests at once (a loader and a page) must not both try: the loser reads the winner's row
    const first = await trx
      .insertInto("app_user_visit")
      .values({ sub, last_request_at: now, current_cluster_ids: clusterIds, previous_visit_at: null, previous_cluster_ids: null })
      .onConflict((oc) => oc.column("sub").doNothing())
      .returning("sub")
      .executeTakeFirst();
    if (first) return { previousVisitAt: null, previousClusterIds: null };
    const row = await trx.selectFrom("app_user_visit").selectAll().where("sub", "=", sub).forUpdate().executeTakeFirstOrThrow();
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
