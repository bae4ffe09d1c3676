import { sql, type Kysely } from "kysely";
import { reloadTable } from "./reload-table.js";

/**
 * agg_exposure and agg_exposure_fleet from the machines' shares (agg_exposure_machine, counted under their
 * agg_exposure_cohort row and at the shop each share row carries: the machine's home shop on those days):
 * summed whole, or changed by the difference a refresh found.
 */

const GRAIN = ["engine_family", "model_line", "build_month", "lot", "shop_key", "month", "temp_band", "hour_band"];
const FLEET_GRAIN = ["engine_family", "model_line", "shop_key", "month", "temp_band", "hour_band"];

/** The columns as a comma-separated list. */
const cols = (names: string[]) => sql.join(names.map((c) => sql.ref(c)));

/** Both aggregates summed from the machines' shares; returns agg_exposure's row count. */
export async function rollUpAll(db: Kysely<any>): Promise<number> {
  const r = await reloadTable(db, "agg_exposure", () =>
    sql`
      INSERT INTO agg_exposure (${cols(GRAIN)}, machines, machine_days, engine_hours)
      SELECT k.engine_family, k.model_line, k.build_month, c.lot, c.shop_key, c.month, c.temp_band, c.hour_band,
             0, sum(c.machine_days), sum(c.engine_hours)
      FROM agg_exposure_machine c JOIN agg_exposure_cohort k USING (machine_key)
      GROUP BY k.engine_family, k.model_line, k.build_month, c.lot, c.shop_key, c.month, c.temp_band, c.hour_band
    `.execute(db),
  );
  await reloadTable(db, "agg_exposure_fleet", () =>
    sql`
      INSERT INTO agg_exposure_fleet (${cols(FLEET_GRAIN)}, machine_days, engine_hours)
      SELECT ${cols(FLEET_GRAIN)}, sum(machine_days), sum(engine_hours) FROM agg_exposure GROUP BY ${cols(FLEET_GRAIN)}
    `.execute(db),
  );
  return Number(r.numAffectedRows ?? 0);
}

/**
 * Adds the temp table `delta` (`grain` columns, days, hours) to `table` through its unique index on the grain:
 * groups that gain their first days are inserted, the others updated, and those whose days reach zero
 * deleted (by the row the update left, so no join is left to the planner's guess). Returns the change in
 * the table's row count.
 */
async function addDelta(db: Kysely<any>, table: string, grain: string[], delta: string, constants: Record<string, number> = {}): Promise<number> {
  const merged = `${delta}_merged`;
  const extra = Object.keys(constants);
  await sql`CREATE TEMP TABLE ${sql.table(merged)} (inserted boolean NOT NULL, emptied boolean NOT NULL, row_id tid NOT NULL) ON COMMIT DROP`.execute(db);
  await sql`
    WITH up AS (
      INSERT INTO ${sql.table(table)} AS t (${cols([...grain, ...extra])}, machine_days, engine_hours)
      SELECT ${cols(grain)}, ${sql.join([...extra.map((c) => sql.lit(constants[c])), sql`days`, sql`hours`])}
      FROM ${sql.table(delta)} WHERE days <> 0 OR hours <> 0
      ON CONFLICT (${cols(grain)}) DO UPDATE
      SET machine_days = t.machine_days + excluded.machine_days, engine_hours = t.engine_hours + excluded.engine_hours
      RETURNING (xmax = 0) AS inserted, t.machine_days = 0 AS emptied, t.ctid AS row_id
    )
    INSERT INTO ${sql.table(merged)} SELECT * FROM up
  `.execute(db);
  const gone = await sql`
    DELETE FROM ${sql.table(table)} WHERE ctid = ANY(ARRAY(SELECT row_id FROM ${sql.table(merged)} WHERE emptied))
  `.execute(db);
  const added = await sql<{ n: number }>`SELECT count(*) FILTER (WHERE inserted)::integer AS n FROM ${sql.table(merged)}`.execute(db);
  return added.rows[0].n - Number(gone.numAffectedRows ?? 0);
}

/**
 * Adds the temp table exposure_delta (GRAIN, days, hours: what the machines' shares gained or lost) to
 * agg_exposure, and the same summed over build month and lot to agg_exposure_fleet. Returns the change in
 * agg_exposure's row count.
 */
export async function applyDelta(db: Kysely<any>): Promise<number> {
  const rows = await addDelta(db, "agg_exposure", GRAIN, "exposure_delta", { machines: 0 });
  await sql`
    CREATE TEMP TABLE exposure_fleet_delta ON COMMIT DROP AS
    SELECT ${cols(FLEET_GRAIN)}, sum(days)::integer AS days, sum(hours) AS hours FROM exposure_delta GROUP BY ${cols(FLEET_GRAIN)}
  `.execute(db);
  await addDelta(db, "agg_exposure_fleet", FLEET_GRAIN, "exposure_fleet_delta");
  return rows;
}
