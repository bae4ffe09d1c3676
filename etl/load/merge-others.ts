import type pg from "pg";
import { checkHourReadings } from "./hour-checks.js";
import { rejudgeLaterReadings } from "./rejudge-readings.js";
import {
  acceptedCount, countChanges, createChanged, registerShops, rejectDuplicates, rejectUnknownMachines, updateClause, type MergeCounts,
} from "./merge-common.js";

/**
 * An upsert on `key` that touches only rows whose content changed, recording (key, inserted) in `changed`;
 * columns in `kept` (absent from the file) stay as stored (see updateClause).
 */
function upsert(table: string, key: string, cols: string[], select: string, kept: readonly string[] = []): string {
  const alias = "t";
  const { set, changed } = updateClause(alias, cols.filter((c) => c !== key), kept);
  return `WITH up AS (
      INSERT INTO ${table} AS ${alias} (${cols.join(", ")}) ${select}
      ON CONFLICT (${key}) DO UPDATE SET ${set}
      WHERE ${changed}
      RETURNING ${alias}.${key} AS key, (xmax = 0) AS inserted
    )
    INSERT INTO changed SELECT key, inserted FROM up`;
}

const MACHINE_COLS = [
  "machine_key", "serial", "model_code", "model_line", "engine_family", "cold_start_aid", "engine_serial", "build_date",
  "delivery_date", "delivery_hours", "home_shop_key", "heater_plug_lot", "block_heater_fitted", "block_heater_date",
  "warranty_base_months", "warranty_base_hours", "warranty_engine_months", "warranty_engine_hours", "row_hash", "batch_id",
];

/** The day a row's home shop applies from when it names another one than the warehouse's: its home_shop_since, else the load date. */
const MOVE_DATE = `coalesce(s.home_shop_since, s.load_date)`;

/**
 * Rows that would move a machine to another home shop on or before the day its current home shop began
 * (machine_home_shop): the move would rewrite the machine's history, so the row is rejected, never applied.
 */
async function rejectBackdatedMoves(client: pg.PoolClient): Promise<void> {
  await client.query(
    `UPDATE stg t SET reject_code = 'backdated_move',
       reject_reason = format('moves machine %s from %s to %s on %s (%s), but it has been at %s only since %s; '
         || 'a move dated on or before that day would rewrite where the machine was, so the row was not loaded '
         || '(give a later home shop since, or leave the home shop as it is)',
         s.serial, cur.shop_code, s.home_shop, ${MOVE_DATE},
         CASE WHEN s.home_shop_since IS NULL THEN 'the load date: the row gives no home shop since' ELSE 'its home shop since' END,
         cur.shop_code, h.valid_from)
     FROM stg s
     JOIN machine_home_shop h ON h.machine_key = wh_key('machine|' || s.serial) AND h.valid_to IS NULL
     JOIN dim_shop cur ON cur.shop_key = h.shop_key
     WHERE t.row_no = s.row_no AND s.reject_code IS NULL AND cur.shop_code <> s.home_shop AND ${MOVE_DATE} <= h.valid_from`,
  );
}

/**
 * machine_home_shop after the master rows are in: a machine the file names at another home shop than its
 * current period's has that period closed on the move's date and the next one opened there; a machine without
 * any period (new, or one that had no home shop) gets its first, from -infinity. A row naming the current home
 * shop changes nothing, whatever home_shop_since it gives. Rows of moves dated too early were rejected before.
 */
async function recordHomeShopMoves(client: pg.PoolClient, batchId: number): Promise<void> {
  await client.query(
    `CREATE TEMP TABLE home_shop_move ON COMMIT DROP AS
     SELECT h.machine_key, sh.shop_key, ${MOVE_DATE} AS day
     FROM stg s
     JOIN machine_home_shop h ON h.machine_key = wh_key('machine|' || s.serial) AND h.valid_to IS NULL
     JOIN dim_shop sh ON sh.shop_code = s.home_shop
     WHERE s.reject_code IS NULL AND h.shop_key <> sh.shop_key`,
  );
  await client.query(
    `UPDATE machine_home_shop h SET valid_to = mv.day FROM home_shop_move mv WHERE h.machine_key = mv.machine_key AND h.valid_to IS NULL`,
  );
  await client.query(
    `INSERT INTO machine_home_shop (machine_key, shop_key, valid_from, valid_to, batch_id)
     SELECT machine_key, shop_key, day, NULL, $1 FROM home_shop_move`,
    [batchId],
  );
  await client.query(
    `INSERT INTO machine_home_shop (machine_key, shop_key, valid_from, valid_to, batch_id)
     SELECT m.machine_key, m.home_shop_key, '-infinity', NULL, $1
     FROM stg s JOIN dim_machine m ON m.machine_key = wh_key('machine|' || s.serial)
     WHERE s.reject_code IS NULL AND m.home_shop_key IS NOT NULL
       AND NOT EXISTS (SELECT 1 FROM machine_home_shop h WHERE h.machine_key = m.machine_key)`,
    [batchId],
  );
}

/**
 * Machine master rows into dim_machine (upsert on the normalised serial), their home shops over time into
 * machine_home_shop, plus the delivery hour reading.
 */
export async function mergeMachines(client: pg.PoolClient, batchId: number, _blocks: unknown, file: { kept: string[] }): Promise<MergeCounts> {
  await rejectDuplicates(client, ["serial"], "machine serial %s");
  await rejectBackdatedMoves(client);
  await registerShops(client, "home_shop");
  const accepted = await acceptedCount(client);
  await createChanged(client);
  await client.query(
    upsert(
      "dim_machine",
      "machine_key",
      MACHINE_COLS,
      `SELECT wh_key('machine|' || s.serial), s.serial, s.model_code, s.model_line, s.engine_family, s.cold_start_aid, s.engine_serial,
         s.build_date, s.delivery_date, s.delivery_hours, sh.shop_key, s.heater_plug_lot, s.block_heater_fitted, s.block_heater_date,
         s.warranty_base_months, s.warranty_base_hours, s.warranty_engine_months, s.warranty_engine_hours, s.row_hash, $1::bigint
       FROM stg s JOIN dim_shop sh ON sh.shop_code = s.home_shop WHERE s.reject_code IS NULL`,
      file.kept,
    ),
    [batchId],
  );
  await recordHomeShopMoves(client, batchId);
  await client.query(
    `INSERT INTO fact_meter_reading AS r (hour_reading_key, machine_key, reading_date, hours, source, row_hash, batch_id)
     SELECT wh_key('hour|delivery|' || s.serial), wh_key('machine|' || s.serial), s.delivery_date, s.delivery_hours, 'delivery',
       md5(concat_ws('|', s.delivery_date, s.delivery_hours)), $1
     FROM stg s WHERE s.reject_code IS NULL AND s.delivery_date IS NOT NULL AND s.delivery_hours IS NOT NULL
     ON CONFLICT (hour_reading_key) DO UPDATE SET reading_date = excluded.reading_date, hours = excluded.hours,
       row_hash = excluded.row_hash, batch_id = excluded.batch_id
     WHERE r.row_hash <> excluded.row_hash`,
    [batchId],
  );
  return countChanges(client, accepted);
}

const MEASUREMENT_COLS = [
  "measurement_key", "repair_line_key", "machine_key", "shop_key", "measured_date", "kind", "position", "attempt", "value", "unit",
  "over_range", "raw_value", "raw_unit", "conversion_rule", "row_hash", "batch_id",
];

/** Readings attached to repair-order lines already in the warehouse (jobs load first). */
export async function mergeMeasurements(client: pg.PoolClient, batchId: number, _blocks: unknown, file: { kept: string[] }): Promise<MergeCounts> {
  await rejectDuplicates(client, ["shop_code", "ro_number", "line_no", "kind", "position", "attempt"],
    "shop %s repair order %s line %s, %s at position %s attempt %s,");
  await client.query(
    `UPDATE stg s SET reject_code = 'unknown_repair_line',
       reject_reason = format('repair order %s line %s of shop %s is not in the warehouse; load the jobs export that has it first',
         s.ro_number, s.line_no, s.shop_code)
     WHERE s.reject_code IS NULL AND NOT EXISTS (
       SELECT 1 FROM fact_repair_line f WHERE f.repair_line_key = wh_key('repair_line|' || s.shop_code || '|' || s.ro_number || '|' || s.line_no))`,
  );
  const accepted = await acceptedCount(client);
  await createChanged(client);
  await client.query(
    upsert(
      "fact_measurement",
      "measurement_key",
      MEASUREMENT_COLS,
      `SELECT wh_key(concat_ws('|', 'measurement', s.shop_code, s.ro_number, s.line_no, s.kind, s.position, s.attempt)),
         f.repair_line_key, f.machine_key, f.shop_key, f.opened_date, s.kind, s.position, s.attempt, s.value, s.unit, s.over_range,
         s.raw_value, s.raw_unit, s.conversion_rule, s.row_hash, $1::bigint
       FROM stg s JOIN fact_repair_line f ON f.repair_line_key = wh_key('repair_line|' || s.shop_code || '|' || s.ro_number || '|' || s.line_no)
       WHERE s.reject_code IS NULL`,
      file.kept,
    ),
    [batchId],
  );
  return countChanges(client, accepted);
}

/** Daily minimum and maximum per shop, in °C. */
export async function mergeWeather(client: pg.PoolClient, batchId: number, _blocks: unknown, file: { kept: string[] }): Promise<MergeCounts> {
  await rejectDuplicates(client, ["shop_code", "date"], "shop %s weather for %s");
  // a kept maximum below the file's new minimum cannot stand
  const { set, changed } = updateClause(
    "w", ["tmin_c", "tmax_c", "source_unit", "row_hash", "batch_id"], file.kept.filter((c) => c !== "tmax_c"),
    file.kept.includes("tmax_c") ? { tmax_c: "CASE WHEN w.tmax_c >= excluded.tmin_c THEN w.tmax_c END" } : {},
  );
  const accepted = await acceptedCount(client);
  await client.query(`CREATE TEMP TABLE changed (shop_key bigint, date date, inserted boolean NOT NULL, PRIMARY KEY (shop_key, date)) ON COMMIT DROP`);
  await client.query(
    `WITH up AS (
       INSERT INTO fact_weather_day AS w (shop_key, date, tmin_c, tmax_c, source_unit, row_hash, batch_id)
       SELECT sh.shop_key, s.date, s.tmin_c, s.tmax_c, s.source_unit, s.row_hash, $1
       FROM stg s JOIN dim_shop sh ON sh.shop_code = s.shop_code WHERE s.reject_code IS NULL
       ON CONFLICT (shop_key, date) DO UPDATE SET ${set}
       WHERE ${changed}
       RETURNING w.shop_key, w.date, (xmax = 0) AS inserted
     )
     INSERT INTO changed SELECT * FROM up`,
    [batchId],
  );
  return countChanges(client, accepted);
}

const HOUR_KEY_TEXT = `'hour|' || s.source || '|' || s.serial || '|' || s.reading_date`;

/** Registry and telematics hour readings, with the same meter checks as repair-order readings. */
export async function mergeHours(client: pg.PoolClient, batchId: number, _blocks: unknown, file: { kept: string[] }): Promise<MergeCounts> {
  await rejectDuplicates(client, ["serial", "reading_date", "source"], "machine %s reading of %s from %s");
  await rejectUnknownMachines(client);
  await checkHourReadings(client, { dateCol: "reading_date", hoursCol: "hours", keyText: HOUR_KEY_TEXT });
  const accepted = await acceptedCount(client);
  await createChanged(client);
  await client.query(
    upsert(
      "fact_meter_reading",
      "hour_reading_key",
      ["hour_reading_key", "machine_key", "reading_date", "hours", "source", "meter_change", "meter_note", "meter_generation", "valid",
        "invalid_reason", "row_hash", "batch_id"],
      `SELECT wh_key(${HOUR_KEY_TEXT}), h.machine_key, s.reading_date, s.hours, s.source, s.meter_change, s.meter_note, h.generation,
         h.valid, h.invalid_reason, md5(concat_ws('|', s.row_hash, h.generation, h.valid)), $1::bigint
       FROM stg s JOIN hr_out h ON h.row_no = s.row_no WHERE s.reject_code IS NULL`,
      file.kept,
    ),
    [batchId],
  );
  await rejudgeLaterReadings(client, batchId, `SELECT h.machine_key, s.reading_date AS d, h.rk AS k FROM stg s JOIN hr_out h ON h.row_no = s.row_no WHERE s.reject_code IS NULL`);
  return countChanges(client, accepted);
}
