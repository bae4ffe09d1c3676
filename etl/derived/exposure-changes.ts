import { sql, type Kysely, type RawBuilder } from "kysely";

/**
 * What the batches after a given one changed, for the exposure refresh: the temp table exposure_scope
 * (machine_key, lo, hi) lists each machine whose exposure must be computed again and the days [lo, hi)
 * to compute (±infinity for the whole trail).
 *
 * A machine's exposure depends on its master row (cohort, build lot), its home shops over time
 * (machine_home_shop), its valid hour readings with their meter generations (delivery and hours-export
 * readings, repair-line meters), its heater-plug failure lines, and the weather of the shop it was homed at
 * on each day. The ETL stamps a row with the batch that wrote it whenever
 * its content changes (batch_id), and never deletes one, so:
 * - dim_machine, machine_home_shop, fact_meter_reading and fact_repair_line rows stamped after the batch name
 *   their machine (a move of home shop stamps the master row and the period it opens: the machine is computed
 *   again whole);
 * - a repair line that moved to another machine is found through the prior version the load kept in
 *   fact_repair_line_history (replaced_by_batch);
 * - the one change not stamped: a jobs load judges the hour meters of every line of its file again, lines it
 *   leaves unchanged too, and may give one another meter generation or set it aside. Unusual verdicts are
 *   few (the partial index fact_repair_line_notable_reading_idx holds them): they are compared with the set
 *   seen at the last refresh (agg_exposure_notable_reading), whenever a jobs batch came since;
 * - weather rows stamped after the batch name a shop and days: every machine homed there at some time in
 *   those months is computed again from the first to the last month those days fall in (its other months keep
 *   their figures; a machine homed at two such shops, over the months of both).
 */

/** The repair lines whose hour-meter verdict is unusual now. */
const NOTABLE_LINES = sql`
  SELECT repair_line_key, machine_key, meter_generation, hour_valid FROM fact_repair_line
  WHERE meter_generation <> 0 OR NOT hour_valid`;

/**
 * Runs a statement that reads NOTABLE_LINES with sequential scans off, so through the partial index: right
 * after a load the statistics may not know how few these lines are.
 */
async function throughNotableIndex(db: Kysely<any>, statement: RawBuilder<unknown>): Promise<void> {
  await sql`SET LOCAL enable_seqscan = off`.execute(db);
  await statement.execute(db);
  await sql`SET LOCAL enable_seqscan TO DEFAULT`.execute(db);
}

/** agg_exposure_notable_reading rewritten from the lines whose verdict is unusual now (a full rebuild). */
export async function recordNotableReadings(db: Kysely<any>): Promise<void> {
  await sql`TRUNCATE agg_exposure_notable_reading`.execute(db);
  await throughNotableIndex(db, sql`INSERT INTO agg_exposure_notable_reading ${NOTABLE_LINES}`);
}

/**
 * Lines whose unusual verdict appeared, went or changed since agg_exposure_notable_reading was written:
 * their machines (before and after, should a line have moved) join exposure_scope whole, and the table is
 * brought up to date. Returns how many machines joined.
 */
async function scopeRejudgedLines(db: Kysely<any>): Promise<number> {
  await throughNotableIndex(db, sql`CREATE TEMP TABLE exposure_notable ON COMMIT DROP AS ${NOTABLE_LINES}`);
  await sql`
    CREATE TEMP TABLE exposure_rejudged ON COMMIT DROP AS
    SELECT repair_line_key, n.machine_key AS now_key, o.machine_key AS was_key
    FROM exposure_notable n FULL JOIN agg_exposure_notable_reading o USING (repair_line_key)
    WHERE (n.machine_key, n.meter_generation, n.hour_valid) IS DISTINCT FROM (o.machine_key, o.meter_generation, o.hour_valid)
  `.execute(db);
  await sql`DELETE FROM agg_exposure_notable_reading o USING exposure_rejudged r WHERE o.repair_line_key = r.repair_line_key`.execute(db);
  await sql`INSERT INTO agg_exposure_notable_reading SELECT n.* FROM exposure_notable n JOIN exposure_rejudged r USING (repair_line_key)`.execute(db);
  const r = await sql`
    INSERT INTO exposure_scope
    SELECT DISTINCT v.machine_key, '-infinity'::date, 'infinity'::date
    FROM exposure_rejudged r CROSS JOIN LATERAL (VALUES (r.now_key), (r.was_key)) AS v(machine_key)
    WHERE v.machine_key IS NOT NULL
    ON CONFLICT (machine_key) DO NOTHING
  `.execute(db);
  return Number(r.numAffectedRows ?? 0);
}

export interface ChangeScope {
  /** machines computed again in full */
  machines: number;
  /** machines computed again for some months, because their shop's weather changed */
  weatherMachines: number;
  /** shops (keys as text) whose weather changed */
  weatherShops: string[];
}

/** Fills exposure_scope with what the batches after `since` changed (see the module comment). */
export async function scopeChanges(db: Kysely<any>, since: number): Promise<ChangeScope> {
  await sql`CREATE TEMP TABLE exposure_scope (machine_key bigint PRIMARY KEY, lo date NOT NULL, hi date NOT NULL) ON COMMIT DROP`.execute(db);
  const whole = await sql`
    INSERT INTO exposure_scope
    SELECT machine_key, '-infinity', 'infinity' FROM (
      SELECT machine_key FROM dim_machine WHERE batch_id > ${since}
      UNION SELECT machine_key FROM machine_home_shop WHERE batch_id > ${since}
      UNION SELECT machine_key FROM fact_meter_reading WHERE batch_id > ${since}
      UNION SELECT machine_key FROM fact_repair_line WHERE batch_id > ${since}
      UNION SELECT (prior_row ->> 'machine_key')::bigint FROM fact_repair_line_history WHERE replaced_by_batch > ${since}
      -- readings a late file re-judged (an hours export can change the verdict of a repair line it does not carry)
      UNION SELECT machine_key FROM hour_verdict_change WHERE batch_id > ${since}
    ) touched
  `.execute(db);
  const jobs = await sql<{ any: boolean }>`SELECT EXISTS (SELECT 1 FROM etl_batch WHERE batch_id > ${since} AND kind = 'jobs') AS any`.execute(db);
  const rejudged = jobs.rows[0].any ? await scopeRejudgedLines(db) : 0;
  const shops = await sql<{ shop_key: string }>`
    SELECT DISTINCT shop_key::text AS shop_key FROM fact_weather_day WHERE batch_id > ${since}
  `.execute(db);
  const weather = await sql`
    INSERT INTO exposure_scope
    SELECT h.machine_key, min(w.lo), max(w.hi)
    FROM (SELECT shop_key, date_trunc('month', min(date)::timestamp)::date AS lo,
                 (date_trunc('month', max(date)::timestamp) + interval '1 month')::date AS hi
          FROM fact_weather_day WHERE batch_id > ${since} GROUP BY shop_key) w
    JOIN machine_home_shop h ON h.shop_key = w.shop_key AND h.valid_from < w.hi AND (h.valid_to IS NULL OR h.valid_to > w.lo)
    JOIN agg_exposure_cohort k ON k.machine_key = h.machine_key
    GROUP BY h.machine_key
    ON CONFLICT (machine_key) DO NOTHING
  `.execute(db);
  await sql`ANALYZE exposure_scope`.execute(db);
  return {
    machines: Number(whole.numAffectedRows ?? 0) + rejudged,
    weatherMachines: Number(weather.numAffectedRows ?? 0),
    weatherShops: shops.rows.map((r) => r.shop_key),
  };
}
