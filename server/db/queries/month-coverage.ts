import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ShopMonthCoverage } from "../../analytics/month-completeness.js";
import { analyticsRead } from "./analytics-base.js";
import { scopedShopCodes } from "./scope.js";

/** A machine not seen for this long before its shop's last record is taken as gone from service after its own last record. */
const GONE_AFTER_DAYS = 365;

/**
 * Per shop and month: exposure machine-days (agg_exposure_fleet, the days hour readings cover) against
 * in-service machine-days (server/analytics/month-completeness.ts gives the definition). A machine is in
 * service from its first valid hour reading, at each home shop for its period there (machine_home_shop), to
 * the end of the month of its shop's last record (the newest reading or repair order of the shop's machines),
 * or, when it was last seen (reading or repair order) more than GONE_AFTER_DAYS before that, to its last record.
 * `shops` narrows to some shops (codes); the caller's scope always applies.
 */
export async function shopMonthCoverage(db: Db, scope: ShopScope, shops: readonly string[] = []): Promise<ShopMonthCoverage[]> {
  const conds: RawBuilder<unknown>[] = [];
  const scoped = scopedShopCodes(scope);
  const list = (codes: readonly string[]) => (codes.length ? sql`s.shop_code IN (${sql.join(codes.map((c) => sql`${c}`))})` : sql`FALSE`);
  if (scoped) conds.push(list(scoped));
  if (shops.length) conds.push(list(shops.map((s) => s.toUpperCase())));
  const shopFilter = conds.length ? sql.join(conds, sql` AND `) : sql`TRUE`;
  const res = await analyticsRead(db, sql<{ shop_code: string; month: string; exposure_days: string; service_days: string; readings_through: string | null }>`
    WITH shop AS (SELECT s.shop_key, s.shop_code FROM dim_shop s WHERE ${shopFilter}),
    rd AS (SELECT machine_key, min(reading_date) AS fd, max(reading_date) AS ld FROM v_engine_hours GROUP BY machine_key),
    seen AS (
      SELECT rd.machine_key, rd.fd, rd.ld, greatest(rd.ld, (SELECT max(opened_date) FROM fact_repair_line f WHERE f.machine_key = rd.machine_key)) AS last_seen
      FROM rd
    ),
    period AS (
      SELECT hs.shop_key, m.machine_key, greatest(m.fd, hs.valid_from) AS s, least(m.last_seen, coalesce(hs.valid_to - 1, 'infinity'::date)) AS last_here,
             coalesce(hs.valid_to - 1, 'infinity'::date) AS period_end, m.ld
      FROM seen m JOIN machine_home_shop hs ON hs.machine_key = m.machine_key
      WHERE hs.shop_key IN (SELECT shop_key FROM shop)
    ),
    shop_end AS (SELECT shop_key, max(last_here) AS d, max(ld) AS readings_through FROM period GROUP BY shop_key),
    span AS (
      SELECT p.shop_key, p.s,
             least(p.period_end, CASE WHEN p.last_here >= e.d - ${GONE_AFTER_DAYS}::integer
                                      THEN (date_trunc('month', e.d) + interval '1 month - 1 day')::date ELSE p.last_here END) AS e
      FROM period p JOIN shop_end e ON e.shop_key = p.shop_key
      WHERE p.s <= p.last_here
    ),
    service AS (
      SELECT sp.shop_key, mo::date AS month,
             sum(least(sp.e, (mo + interval '1 month - 1 day')::date) - greatest(sp.s, mo::date) + 1)::bigint AS days
      FROM span sp CROSS JOIN LATERAL generate_series(date_trunc('month', sp.s), date_trunc('month', sp.e), interval '1 month') AS mo
      GROUP BY 1, 2
    ),
    exposure AS (
      SELECT shop_key, month, sum(machine_days)::bigint AS days FROM agg_exposure_fleet
      WHERE shop_key IN (SELECT shop_key FROM shop) GROUP BY 1, 2
    )
    SELECT sh.shop_code, to_char(coalesce(sv.month, ex.month), 'YYYY-MM') AS month,
           coalesce(ex.days, 0) AS exposure_days, coalesce(sv.days, 0) AS service_days, to_char(e.readings_through, 'YYYY-MM-DD') AS readings_through
    FROM service sv FULL JOIN exposure ex ON ex.shop_key = sv.shop_key AND ex.month = sv.month
    JOIN shop sh ON sh.shop_key = coalesce(sv.shop_key, ex.shop_key)
    LEFT JOIN shop_end e ON e.shop_key = sh.shop_key
    ORDER BY 1, 2
  `);
  return res.rows.map((r) => ({
    shopCode: r.shop_code,
    month: r.month,
    exposureDays: Number(r.exposure_days),
    serviceDays: Number(r.service_days),
    readingsThrough: r.readings_through,
  }));
}
