import { sql, type Kysely } from "kysely";

/**
 * agg_exposure and agg_exposure_fleet from the machines' shares (agg_exposure_machine, counted under their
 * agg_exposure_cohort row): summed whole, or changed by the difference a refresh found.
 */

const GRAIN = ["engine_family", "model_line", "build_month", "lot", "shop_key", "month", "temp_band", "hour_band"];
const FLEET_GRAIN = ["engine_family", "model_line", "shop_key", "month", "temp_band", "hour_band"];

/** The columns, optionally of one table alias, as a comma-separated list. */
const cols = (names: string[], alias?: string) => sql.join(names.map((c) => sql.ref(alias ? `${alias}.${c}` : c)));

/** Fleet rows (agg_exposure summed over build month and lot) of the groups in the table `only` (FLEET_GRAIN columns), or of all. */
async function insertFleet(db: Kysely<any>, only?: string): Promise<void> {
  await sql`
    INSERT INTO agg_exposure_fleet (${cols(FLEET_GRAIN)}, machine_days, engine_hours)
    SELECT ${cols(FLEET_GRAIN)}, sum(machine_days), sum(engine_hours)
    FROM agg_exposure ${only ? sql`JOIN ${sql.table(only)} USING (${cols(FLEET_GRAIN)})` : sql``}
    GROUP BY ${cols(FLEET_GRAIN)}
  `.execute(db);
}

/** Both aggregates summed from the machines' shares; returns agg_exposure's row count. */
export async function rollUpAll(db: Kysely<any>): Promise<number> {
  await sql`TRUNCATE agg_exposure`.execute(db);
  const r = await sql`
    INSERT INTO agg_exposure (${cols(GRAIN)}, machines, machine_days, engine_hours)
    SELECT k.engine_family, k.model_line, k.build_month, c.lot, k.shop_key, c.month, c.temp_band, c.hour_band,
           0, sum(c.machine_days), sum(c.engine_hours)
    FROM agg_exposure_machine c JOIN agg_exposure_cohort k USING (machine_key)
    GROUP BY k.engine_family, k.model_line, k.build_month, c.lot, k.shop_key, c.month, c.temp_band, c.hour_band
  `.execute(db);
  await sql`TRUNCATE agg_exposure_fleet`.execute(db);
  await insertFleet(db);
  return Number(r.numAffectedRows ?? 0);
}

/**
 * Adds the temp table exposure_delta (GRAIN, days, hours: what the machines' shares gained or lost) to
 * agg_exposure: groups that gain their first days are inserted, groups whose days reach zero are deleted.
 * The fleet groups touched are summed again from agg_exposure. Returns the change in agg_exposure's row count.
 */
export async function applyDelta(db: Kysely<any>): Promise<number> {
  const added = await sql<{ n: number }>`
    WITH up AS (
      INSERT INTO agg_exposure AS e (${cols(GRAIN)}, machines, machine_days, engine_hours)
      SELECT ${cols(GRAIN)}, 0, days, hours FROM exposure_delta WHERE days <> 0 OR hours <> 0
      ON CONFLICT (${cols(GRAIN)}) DO UPDATE
      SET machine_days = e.machine_days + excluded.machine_days, engine_hours = e.engine_hours + excluded.engine_hours
      RETURNING (xmax = 0) AS inserted
    )
    SELECT count(*) FILTER (WHERE inserted)::integer AS n FROM up
  `.execute(db);
  const gone = await sql`
    DELETE FROM agg_exposure e USING exposure_delta d
    WHERE e.machine_days = 0 AND (${cols(GRAIN, "e")}) = (${cols(GRAIN, "d")})
  `.execute(db);
  await sql`CREATE TEMP TABLE exposure_fleet_groups ON COMMIT DROP AS SELECT DISTINCT ${cols(FLEET_GRAIN)} FROM exposure_delta`.execute(db);
  await sql`ANALYZE exposure_fleet_groups`.execute(db);
  await sql`DELETE FROM agg_exposure_fleet f USING exposure_fleet_groups g WHERE (${cols(FLEET_GRAIN, "f")}) = (${cols(FLEET_GRAIN, "g")})`.execute(db);
  await insertFleet(db, "exposure_fleet_groups");
  return added.rows[0].n - Number(gone.numAffectedRows ?? 0);
}
