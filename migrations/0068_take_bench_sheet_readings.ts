import { sql, type Kysely } from "kysely";

// Readings a technician enters on the bench sheet at the machine go through the same loader as the shops'
// exports. A batch says where its file came from (a shop's export, or a bench sheet written by the server);
// the sheet's conditions and checks that are not numbers on a gauge become reading kinds of their own
// (ambient temperature, engine cold or warm, wait-to-start lamp, a plug's bench test); a sheet's hour-meter
// reading is a reading source of its own.
const OLD_KINDS = ["compression", "plug_resistance", "rail_voltage", "battery_voltage"];
const NEW_KINDS = [...OLD_KINDS, "ambient_temperature", "engine_state", "preheat_lamp", "bench_test"];
const OLD_SOURCES = ["delivery", "ro", "pm", "telematics", "registry"];
const NEW_SOURCES = [...OLD_SOURCES, "sheet"];

const list = (xs: string[]) => sql.raw(xs.map((x) => `'${x}'`).join(", "));

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE etl_batch ADD COLUMN source text NOT NULL DEFAULT 'export' CONSTRAINT etl_batch_source_check CHECK (source IN ('export', 'sheet'))`.execute(db);
  await sql`ALTER TABLE fact_measurement DROP CONSTRAINT fact_measurement_kind_check`.execute(db);
  await sql`ALTER TABLE fact_measurement ADD CONSTRAINT fact_measurement_kind_check CHECK (kind IN (${list(NEW_KINDS)}))`.execute(db);
  await sql`ALTER TABLE fact_meter_reading DROP CONSTRAINT fact_hour_reading_source_check`.execute(db);
  await sql`ALTER TABLE fact_meter_reading ADD CONSTRAINT fact_hour_reading_source_check CHECK (source IN (${list(NEW_SOURCES)}))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DELETE FROM fact_measurement WHERE kind NOT IN (${list(OLD_KINDS)})`.execute(db);
  await sql`DELETE FROM fact_meter_reading WHERE source = 'sheet'`.execute(db);
  await sql`ALTER TABLE fact_meter_reading DROP CONSTRAINT fact_hour_reading_source_check`.execute(db);
  await sql`ALTER TABLE fact_meter_reading ADD CONSTRAINT fact_hour_reading_source_check CHECK (source IN (${list(OLD_SOURCES)}))`.execute(db);
  await sql`ALTER TABLE fact_measurement DROP CONSTRAINT fact_measurement_kind_check`.execute(db);
  await sql`ALTER TABLE fact_measurement ADD CONSTRAINT fact_measurement_kind_check CHECK (kind IN (${list(OLD_KINDS)}))`.execute(db);
  await sql`ALTER TABLE etl_batch DROP COLUMN source`.execute(db);
}
