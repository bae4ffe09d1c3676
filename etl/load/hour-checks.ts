import type pg from "pg";
import { anyNotableLine, fmtSql } from "./merge-common.js";

/**
 * Hour-meter checks for the readings a file brings (jobs: one per repair-order line; hours exports).
 * Readings of one machine are put in date order together with the warehouse's valid readings. A reading
 * with a meter note (a replaced or reset meter) starts a new meter generation and is compared only within it.
 * - A reading more than 2 h [C] below the highest earlier-dated reading of its generation is rejected.
 * - A rise of more than 24 h per calendar day over the previous reading is kept but marked invalid.
 * Results land in the temp table hr_out (row_no, rk, machine_key, generation, valid, invalid_reason): every
 * accepted reading, or with `onlyNotable` only those whose verdict is not the usual one (generation 0, valid),
 * which is all a caller that stores the usual verdict by default needs; then, when no reading goes
 * backwards, one window pass writes nothing but those few rows.
 */
export const BACKWARDS_TOLERANCE_H = 2;
export const MAX_HOURS_PER_DAY = 24;

export interface ReadingSpec {
  dateCol: string;
  hoursCol: string;
  /** SQL over stg s: the text whose wh_key is the reading's fact_hour_reading key (unless precomputed) */
  keyText?: string;
  /** staging columns holding the machine key and the reading key, when the loader computed them */
  precomputed?: { machineKey: string; readingKey: string };
  /** readings of this batch already in the warehouse (merged block by block) that are the file's own rows */
  batchId?: number;
  onlyNotable?: boolean;
  /** whether any of the file's accepted readings notes a meter change, when the loader knows (else looked up) */
  fileMeterChanges?: boolean;
  /** the machine keys of the file's readings, when the loader knows them all (else taken from the readings) */
  machineKeys?: string[];
  /**
   * true when no reading of the file is stored under another batch (with `batchId`: the file has no
   * unchanged line), so that the warehouse's readings need not be matched against the file's keys
   */
  noneStoredBefore?: boolean;
}

/** Runs the checks; returns how many of the file's rows were rejected as going backwards. */
export async function checkHourReadings(client: pg.PoolClient, spec: ReadingSpec): Promise<number> {
  // Without a meter change among the readings involved every reading is in generation 0, and one window
  // pass does instead of two. Looked up cheaply: the file's rows, the few repair lines stored with a later
  // generation or set aside (partial index), and the small table of other readings.
  const fileChanges =
    spec.fileMeterChanges ??
    (await client.query<{ any: boolean }>(`SELECT EXISTS (SELECT 1 FROM stg WHERE reject_code IS NULL AND meter_change) AS any`)).rows[0].any;
  const anyChange =
    fileChanges ||
    (await client.query<{ any: boolean }>(`SELECT EXISTS (SELECT 1 FROM fact_meter_reading r WHERE r.meter_change) AS any`)).rows[0].any ||
    (await anyNotableLine(client, `SELECT 1 FROM fact_repair_line f WHERE (f.meter_generation <> 0 OR NOT f.hour_valid) AND f.meter_note IS NOT NULL`));
  const generations = anyChange
    ? `g AS (
      SELECT *, sum(mc::int) OVER (PARTITION BY machine_key ORDER BY d, row_no NULLS FIRST ROWS UNBOUNDED PRECEDING) AS gen
      FROM all_r
    )`
    : `g AS (SELECT *, 0::bigint AS gen FROM all_r)`;
  const readings = `
    WITH file_r AS (
      ${
        spec.precomputed
          ? `SELECT s.row_no, s.${spec.precomputed.machineKey} AS machine_key, s.${spec.dateCol} AS d, s.${spec.hoursCol} AS h,
               s.meter_change AS mc, s.${spec.precomputed.readingKey} AS rk
             FROM stg s`
          : `SELECT s.row_no, m.machine_key, s.${spec.dateCol} AS d, s.${spec.hoursCol} AS h, s.meter_change AS mc,
               wh_key(${spec.keyText}) AS rk
             FROM stg s JOIN dim_machine m ON m.serial = s.serial`
      }
      WHERE s.reject_code IS NULL AND s.${spec.hoursCol} IS NOT NULL
    ),
    wh_r AS (
      SELECT r.machine_key, r.reading_date AS d, r.hours AS h, r.meter_change AS mc, NULL::integer AS row_no, NULL::bigint AS rk
      FROM fact_hour_reading r
      WHERE r.valid AND ${spec.machineKeys ? `r.machine_key = ANY($1::bigint[])` : `r.machine_key IN (SELECT machine_key FROM file_r)`}
        ${spec.batchId === undefined ? "" : `AND r.batch_id <> ${Number(spec.batchId)}`}
        ${spec.noneStoredBefore ? "" : `AND NOT EXISTS (SELECT 1 FROM file_r f WHERE f.rk = r.hour_reading_key)`}
    ),
    all_r AS (SELECT machine_key, d, h, mc, row_no, rk FROM file_r UNION ALL SELECT machine_key, d, h, mc, row_no, rk FROM wh_r),
    ${generations}
    -- one sort serves both windows: (machine, generation, date) is a prefix of (…, row)
    SELECT *, max(h) OVER (PARTITION BY machine_key, gen ORDER BY d RANGE BETWEEN UNBOUNDED PRECEDING AND '1 day' PRECEDING) AS prior_max,
           lag(h) OVER w AS prev_h, lag(d) OVER w AS prev_d
    FROM g WINDOW w AS (PARTITION BY machine_key, gen ORDER BY d, row_no NULLS FIRST)`;
  const params = spec.machineKeys ? [spec.machineKeys] : [];
  const rise = `h - prev_h > ${MAX_HOURS_PER_DAY} * greatest(d - prev_d, 1)`;
  const verdicts = (l: string, extra = "") => `
    SELECT ${extra}row_no, rk, machine_key, gen::integer AS generation, NOT COALESCE(${rise}, false) AS valid,
      CASE WHEN ${rise} THEN format('rose %s h in %s day(s) since %s h on %s', ${fmtSql("h - prev_h")}, greatest(d - prev_d, 1), ${fmtSql("prev_h")}, prev_d) END AS invalid_reason
    FROM ${l} WHERE row_no IS NOT NULL`;
  const keyVerdicts = async () => {
    await client.query(`ALTER TABLE hr_out ADD PRIMARY KEY (row_no)`);
    await client.query(`ANALYZE hr_out`);
  };

  if (spec.onlyNotable) {
    // Usually no reading goes backwards: then the verdicts come straight from the window pass and only the
    // few unusual ones are written. If some reading does, the pass is taken again in full below, since
    // rejecting it changes the comparisons of the readings after it.
    await client.query(`
      CREATE TEMP TABLE hr_out ON COMMIT DROP AS
      SELECT * FROM (${verdicts(`(${readings}) l`, `prior_max > h + ${BACKWARDS_TOLERANCE_H} AS backwards, `)}) v
      WHERE generation <> 0 OR NOT valid OR backwards`, params);
    const any = await client.query<{ any: boolean }>(`SELECT EXISTS (SELECT 1 FROM hr_out WHERE backwards) AS any`);
    if (!any.rows[0].any) {
      await client.query(`ALTER TABLE hr_out DROP COLUMN backwards`);
      await keyVerdicts();
      return 0;
    }
    await client.query(`DROP TABLE hr_out`);
  }

  await client.query(`CREATE TEMP TABLE hr ON COMMIT DROP AS ${readings}`, params);
  await client.query(`ANALYZE hr`);

  // the rejected readings leave hr too, so that the verdicts below are taken over the accepted ones
  const rejected = await client.query(`
    WITH rej AS (
    UPDATE stg s SET reject_code = 'hour_meter_backwards',
      reject_reason = format('hour meter %s h is lower than the %s h recorded for this machine on %s; if the meter was replaced, say so in the meter note',
        ${fmtSql("x.h")}, ${fmtSql("x.prior_max")}, x.prior_date)
    FROM (
      SELECT b.row_no, b.h, b.prior_max, max(o.d) AS prior_date
      FROM hr b JOIN hr o ON o.machine_key = b.machine_key AND o.gen = b.gen AND o.d < b.d AND o.h = b.prior_max
      WHERE b.row_no IS NOT NULL AND b.prior_max > b.h + ${BACKWARDS_TOLERANCE_H}
      GROUP BY b.row_no, b.h, b.prior_max
    ) x
    WHERE s.row_no = x.row_no
    RETURNING s.row_no
    )
    DELETE FROM hr USING rej WHERE hr.row_no = rej.row_no`);

  // The verdicts. Each reading is compared with the one before it among the accepted readings; hr has
  // that already unless some reading was just rejected, and then the comparison is taken again.
  const n = rejected.rowCount ?? 0;
  const ordered = n === 0
    ? `SELECT * FROM hr`
    : `SELECT machine_key, d, h, row_no, rk, gen, lag(h) OVER w AS prev_h, lag(d) OVER w AS prev_d
       FROM hr WINDOW w AS (PARTITION BY machine_key, gen ORDER BY d, row_no NULLS FIRST)`;
  await client.query(`
    CREATE TEMP TABLE hr_out ON COMMIT DROP AS
    SELECT * FROM (${verdicts(`(${ordered}) l`)}) v ${spec.onlyNotable ? "WHERE v.generation <> 0 OR NOT v.valid" : ""}`);
  await keyVerdicts();
  return n;
}
