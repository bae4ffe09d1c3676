import type pg from "pg";
import { BACKWARDS_TOLERANCE_H, MAX_HOURS_PER_DAY } from "./hour-checks.js";
import { fmtSql } from "./merge-common.js";

/**
 * A file's reading dated earlier than readings already stored for the same machine (it arrives late) can make
 * those later readings implausible: lower than it by more than the tolerance, or a rise since it faster than
 * a day allows. After the file's own readings are judged and stored, the stored valid readings of such
 * machines that come after the late one are judged again, by the same rules as the hour checks
 * (etl/load/hour-checks.ts), within their meter generation. A reading the new order condemns is set aside
 * (valid = false, with the reason) and the change recorded in hour_verdict_change. Costs one indexed probe
 * per machine of the file when nothing arrives late, which is the usual monthly load.
 *
 * `fileReadings`: SQL giving (machine_key, d) for the file's accepted readings.
 */
export async function rejudgeLaterReadings(client: pg.PoolClient, batchId: number, fileReadings: string): Promise<number> {
  const B = Number(batchId);
  if (!Number.isSafeInteger(B)) throw new Error(`not a batch id: ${batchId}`);
  await client.query(`DROP TABLE IF EXISTS late_machines`);
  await client.query(`CREATE TEMP TABLE late_machines ON COMMIT DROP AS SELECT machine_key, min(d) AS d FROM (${fileReadings}) f GROUP BY machine_key`);
  await client.query(
    `DELETE FROM late_machines l WHERE NOT EXISTS (
       SELECT 1 FROM fact_hour_reading r WHERE r.machine_key = l.machine_key AND r.reading_date > l.d AND r.valid AND r.batch_id <> ${B})`,
  );
  const any = await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM late_machines`);
  if (any.rows[0].n === 0) return 0;
  const rise = `w.h - w.prev_h > ${MAX_HOURS_PER_DAY} * greatest(w.d - w.prev_d, 1)`;
  await client.query(`DROP TABLE IF EXISTS rejudged`);
  await client.query(
    `CREATE TEMP TABLE rejudged ON COMMIT DROP AS
     WITH r AS (
       SELECT r.hour_reading_key AS k, r.source, r.machine_key, r.reading_date AS d, r.hours AS h, r.meter_generation AS gen, r.batch_id
       FROM fact_hour_reading r JOIN late_machines l USING (machine_key) WHERE r.valid
     ), w AS (
       SELECT r.*,
         max(h) OVER (PARTITION BY machine_key, gen ORDER BY d RANGE BETWEEN UNBOUNDED PRECEDING AND '1 day' PRECEDING) AS prior_max,
         lag(h) OVER o AS prev_h, lag(d) OVER o AS prev_d
       FROM r WINDOW o AS (PARTITION BY machine_key, gen ORDER BY d, k)
     )
     SELECT w.k, w.source, w.machine_key, w.d, w.h,
       CASE WHEN w.prior_max > w.h + ${BACKWARDS_TOLERANCE_H}
         THEN format('%s h is lower than the %s h of a reading dated before it that was loaded later (batch ${B})', ${fmtSql("w.h")}, ${fmtSql("w.prior_max")})
         ELSE format('rose %s h in %s day(s) since %s h on %s, a reading loaded later (batch ${B})', ${fmtSql("w.h - w.prev_h")}, greatest(w.d - w.prev_d, 1), ${fmtSql("w.prev_h")}, w.prev_d)
       END AS reason
     FROM w JOIN late_machines l USING (machine_key)
     WHERE w.d > l.d AND w.batch_id <> ${B} AND (w.prior_max > w.h + ${BACKWARDS_TOLERANCE_H} OR ${rise})`,
  );
  const n = (await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM rejudged`)).rows[0].n;
  if (n === 0) return 0;
  await client.query(
    `INSERT INTO hour_verdict_change (hour_reading_key, machine_key, reading_date, hours, source, batch_id, was_valid, now_valid, reason)
     SELECT k, machine_key, d, h, source, ${B}, true, false, reason FROM rejudged`,
  );
  await client.query(`UPDATE fact_repair_line f SET hour_valid = false, hour_invalid_reason = j.reason FROM rejudged j WHERE j.source = 'ro' AND f.repair_line_key = j.k`);
  await client.query(`UPDATE fact_meter_reading m SET valid = false, invalid_reason = j.reason FROM rejudged j WHERE j.source <> 'ro' AND m.hour_reading_key = j.k`);
  return n;
}
