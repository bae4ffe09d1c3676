import type pg from "pg";
import { BACKWARDS_TOLERANCE_H, MAX_HOURS_PER_DAY } from "./hour-checks.js";
import { fmtSql } from "./merge-common.js";

/**
 * A reading dated earlier than readings already stored for the same machine (it arrives late) changes what
 * the readings after it should be compared with. After the file's own readings are judged (hour checks) and
 * stored, each such machine's readings dated after the late one are judged again, once, by the two rules of
 * the hour checks (etl/load/hour-checks.ts; DOMAIN.md "Hour-meter cleaning", common practice, no source):
 * - backwards: more than 2 h below the highest valid reading of its meter generation dated before it;
 * - rise: more than 24 h per calendar day (at least one day) above the previous valid reading of its generation.
 *
 * One walk per machine and meter generation (as stored: a meter change note starts one), in date order, then
 * hours, then key: the order a meter gives, whatever order the readings arrived in. It starts from the stored
 * verdicts of the readings dated up to the late date (the file's readings of that day were just judged by the
 * hour checks, which take a day's stored readings before the file's, so a late reading cannot change the
 * verdict of one stored on its own day). Each later reading is compared with the readings before it that are
 * valid by the same walk, so a reading the new order condemns no longer condemns the ones after it, and one
 * set aside by a comparison that no longer holds passes again: each gets the verdict it would have had had the
 * machine's readings arrived in date order. Judging again gives the same result, so loading the same readings
 * again changes nothing.
 *
 * Which readings take part. The two rules own these reasons, and a reading invalid for one of them is judged
 * again like a valid one: "rose … h in … day(s) since …" (hour checks and this walk) and "… h is lower than
 * the … h …" (this walk; a file's rows going backwards are rejected by the hour checks, never stored). A
 * reading set aside for any other reason, or with none (a rule this walk does not own: a meter note problem,
 * a hand correction), keeps its verdict and, being invalid, counts for nothing, as in the hour checks.
 *
 * What is written. Every verdict of the walk that differs from the stored one: hour_valid /
 * hour_invalid_reason on the repair line, valid / invalid_reason on the meter reading (stamped with the batch,
 * as every row whose content changes: the exposure refresh finds changed meter readings by that stamp, and
 * repair lines by their unusual verdicts). A reading stored by an earlier batch and not brought by this file
 * gets a row in hour_verdict_change (was/now valid, the reason in words); the file's own later readings are
 * judged as part of their load, so the walk's verdict replaces the hour checks' without a record. A verdict
 * that stays invalid keeps its reason text.
 *
 * Cost. One indexed probe per machine of the file (fact_hour_reading by machine and date): when no stored
 * reading of another batch is dated after the file's earliest reading of the machine, nothing else runs,
 * which is the usual monthly load. Stored readings the file brings again unchanged do not make a machine
 * late, so an overlapping re-export keeps the hour checks' verdicts.
 *
 * `fileReadings`: SQL giving (machine_key, d, k) for the file's accepted readings: machine, date, reading key.
 */
export interface Rejudged {
  /** stored readings of earlier batches set aside by the walk */
  setAside: number;
  /** stored readings of earlier batches valid again */
  madeValid: number;
}

/** The reasons the two rules give, as a SQL condition on `col` (see the module comment). */
export const OWN_REASON = (col: string) =>
  `${col} ~ '^(rose -?[0-9][0-9,]*(\\.[0-9])? h in [0-9]+ day\\(s\\) since |-?[0-9][0-9,]*(\\.[0-9])? h is lower than the )'`;

export async function rejudgeLaterReadings(client: pg.PoolClient, batchId: number, fileReadings: string): Promise<Rejudged> {
  const B = Number(batchId);
  if (!Number.isSafeInteger(B)) throw new Error(`not a batch id: ${batchId}`);
  const none: Rejudged = { setAside: 0, madeValid: 0 };
  for (const t of ["late_machines", "late_file", "rj_r", "rj_walk", "rejudged"]) await client.query(`DROP TABLE IF EXISTS ${t}`);

  // the probe: machines with a stored reading of another batch dated after the file's earliest reading
  await client.query(
    `CREATE TEMP TABLE late_machines ON COMMIT DROP AS SELECT machine_key, min(d) AS d FROM (${fileReadings}) f GROUP BY machine_key`,
  );
  // LIMIT 1 keeps the subquery a probe per machine through (machine_key, reading_date) on both tables of the
  // view; a plain NOT EXISTS is planned as an anti join that reads every stored reading into a hash
  const later = (extra = "") => `
    DELETE FROM late_machines l WHERE NOT EXISTS (SELECT 1 FROM (
      SELECT 1 FROM fact_hour_reading r
      WHERE r.machine_key = l.machine_key AND r.reading_date > l.d AND r.batch_id <> ${B} ${extra} LIMIT 1) x)`;
  await client.query(later());
  if (!(await anyRow(client, "late_machines"))) return none;

  // the file's readings of those machines; a stored reading the file brings unchanged is not a later one
  await client.query(
    `CREATE TEMP TABLE late_file ON COMMIT DROP AS
     SELECT DISTINCT f.k FROM (${fileReadings}) f JOIN late_machines l USING (machine_key)`,
  );
  await client.query(`ALTER TABLE late_file ADD PRIMARY KEY (k)`);
  await client.query(later(`AND NOT EXISTS (SELECT 1 FROM late_file o WHERE o.k = r.hour_reading_key)`));
  if (!(await anyRow(client, "late_machines"))) return none;
  await client.query(`ALTER TABLE late_machines ADD PRIMARY KEY (machine_key)`);
  await client.query(`ANALYZE late_machines`);

  // the readings to judge again, numbered in walk order within each machine and generation
  await client.query(
    `CREATE TEMP TABLE rj_r ON COMMIT DROP AS
     SELECT r.machine_key, r.meter_generation AS gen,
       row_number() OVER (PARTITION BY r.machine_key, r.meter_generation ORDER BY r.reading_date, r.hours, r.hour_reading_key)::integer AS i,
       r.hour_reading_key AS k, r.source, r.reading_date AS d, r.hours AS h, r.valid, r.invalid_reason AS reason,
       (r.batch_id = ${B} OR EXISTS (SELECT 1 FROM late_file x WHERE x.k = r.hour_reading_key)) AS own, l.d AS from_d
     FROM late_machines l CROSS JOIN LATERAL (
       -- by machine through the (machine_key, reading_date) indexes; OFFSET 0 keeps the planner from making
       -- this a join that reads every stored reading
       SELECT * FROM fact_hour_reading r
       WHERE r.machine_key = l.machine_key AND r.reading_date > l.d AND (r.valid OR ${OWN_REASON("r.invalid_reason")}) OFFSET 0
     ) r`,
  );
  await client.query(`ALTER TABLE rj_r ADD PRIMARY KEY (machine_key, gen, i)`);
  await client.query(`ANALYZE rj_r`);

  // The walk. State after each reading: the highest valid reading dated before the day of the last one (mx,
  // on mx_d) and the highest valid one on that day (dmx), since readings of the same day do not condemn one
  // another as going backwards; and the previous valid reading (prev_h on prev_d). It starts from the
  // readings dated up to the late date, with their stored verdicts.
  const step = `
    SELECT r.machine_key, r.gen, r.i, r.d AS d_last, c.pm::numeric AS mx, c.pm_d AS mx_d,
      (CASE WHEN c.new_day THEN CASE WHEN v.ok THEN r.h END
           WHEN v.ok THEN greatest(w.dmx, r.h) ELSE w.dmx END)::numeric AS dmx,
      (CASE WHEN v.ok THEN r.h ELSE w.prev_h END)::numeric AS prev_h, CASE WHEN v.ok THEN r.d ELSE w.prev_d END AS prev_d,
      v.ok, v.backwards, (CASE WHEN v.backwards THEN c.pm ELSE w.prev_h END)::numeric AS cmp_h,
      CASE WHEN v.backwards THEN c.pm_d ELSE w.prev_d END AS cmp_d
    FROM walk w
    JOIN rj_r r ON r.machine_key = w.machine_key AND r.gen = w.gen AND r.i = w.i + 1
    CROSS JOIN LATERAL (SELECT w.d_last IS NULL OR r.d > w.d_last AS new_day) n
    CROSS JOIN LATERAL (
      SELECT n.new_day,
        CASE WHEN n.new_day THEN greatest(w.mx, w.dmx) ELSE w.mx END AS pm,
        CASE WHEN n.new_day AND w.dmx IS NOT NULL AND (w.mx IS NULL OR w.dmx >= w.mx) THEN w.d_last ELSE w.mx_d END AS pm_d
    ) c
    CROSS JOIN LATERAL (SELECT COALESCE(c.pm > r.h + ${BACKWARDS_TOLERANCE_H}, false) AS backwards) b
    CROSS JOIN LATERAL (
      SELECT b.backwards,
        NOT b.backwards AND NOT COALESCE(r.h - w.prev_h > ${MAX_HOURS_PER_DAY} * greatest(r.d - w.prev_d, 1), false) AS ok
    ) v`;
  const before = (order: string) => `
    SELECT x.hours AS h, x.reading_date AS d FROM fact_hour_reading x
    WHERE x.machine_key = g.machine_key AND x.meter_generation = g.gen AND x.valid AND x.reading_date <= g.from_d
    ORDER BY ${order} LIMIT 1`;
  await client.query(
    `CREATE TEMP TABLE rj_walk ON COMMIT DROP AS
     WITH RECURSIVE walk AS (
       SELECT g.machine_key, g.gen, 0 AS i, NULL::date AS d_last, m.h::numeric AS mx, m.d AS mx_d, NULL::numeric AS dmx, p.h::numeric AS prev_h, p.d AS prev_d,
         NULL::boolean AS ok, NULL::boolean AS backwards, NULL::numeric AS cmp_h, NULL::date AS cmp_d
       FROM (SELECT machine_key, gen, from_d FROM rj_r WHERE i = 1) g
       LEFT JOIN LATERAL (${before("x.reading_date DESC, x.hours DESC, x.hour_reading_key DESC")}) p ON true
       LEFT JOIN LATERAL (${before("x.hours DESC, x.reading_date DESC")}) m ON true
       UNION ALL
       ${step}
     )
     SELECT machine_key, gen, i, ok, backwards, cmp_h, cmp_d FROM walk WHERE i > 0`,
  );

  // the verdicts that change, with the reason in words
  const stem = `CASE WHEN w.backwards
      THEN format('%s h is lower than the %s h recorded for this machine on %s', ${fmtSql("r.h")}, ${fmtSql("w.cmp_h")}, w.cmp_d)
      ELSE format('rose %s h in %s day(s) since %s h on %s', ${fmtSql("r.h - w.cmp_h")}, greatest(r.d - w.cmp_d, 1), ${fmtSql("w.cmp_h")}, w.cmp_d) END`;
  const again = `format('judged again when batch ${B} brought a reading of this machine dated %s', r.from_d)`;
  await client.query(
    `CREATE TEMP TABLE rejudged ON COMMIT DROP AS
     SELECT r.k, r.source, r.machine_key, r.d, r.h, r.own, w.ok AS now_valid,
       CASE WHEN w.ok THEN NULL WHEN r.own THEN ${stem} ELSE ${stem} || '; ' || ${again} END AS reason,
       CASE WHEN w.ok
         THEN format('valid again: %s, it is neither more than ${BACKWARDS_TOLERANCE_H} h below an earlier valid reading nor a rise of more than ${MAX_HOURS_PER_DAY} h a day since the previous one (it had been set aside: %s)', ${again}, r.reason)
         ELSE ${stem} || '; ' || ${again} END AS change_reason
     FROM rj_walk w JOIN rj_r r USING (machine_key, gen, i)
     WHERE w.ok <> r.valid`,
  );
  await client.query(
    `INSERT INTO hour_verdict_change (hour_reading_key, machine_key, reading_date, hours, source, batch_id, was_valid, now_valid, reason)
     SELECT k, machine_key, d, h, source, ${B}, NOT now_valid, now_valid, change_reason FROM rejudged WHERE NOT own`,
  );
  await client.query(
    `UPDATE fact_repair_line f SET hour_valid = j.now_valid, hour_invalid_reason = j.reason
     FROM rejudged j WHERE j.source = 'ro' AND f.repair_line_key = j.k`,
  );
  await client.query(
    `UPDATE fact_meter_reading m SET valid = j.now_valid, invalid_reason = j.reason, batch_id = ${B}
     FROM rejudged j WHERE j.source <> 'ro' AND m.hour_reading_key = j.k`,
  );
  const n = await client.query<Rejudged>(
    `SELECT count(*) FILTER (WHERE NOT now_valid)::int AS "setAside", count(*) FILTER (WHERE now_valid)::int AS "madeValid"
     FROM rejudged WHERE NOT own`,
  );
  return n.rows[0];
}

async function anyRow(client: pg.PoolClient, table: string): Promise<boolean> {
  return (await client.query<{ any: boolean }>(`SELECT EXISTS (SELECT 1 FROM ${table}) AS any`)).rows[0].any;
}
