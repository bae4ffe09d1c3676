import { sql, type Kysely } from "kysely";

// The exposure aggregates are kept up to date by difference instead of rebuilt after every load
// (etl/derived/refresh-exposure.ts). What that needs:
// - agg_exposure_machine: each machine's own share of agg_exposure (machine-days and engine hours per month ×
//   heater-plug lot × temperature band × hour band), so that a machine a load touched can be taken out of the
//   aggregate and put back in with its new figures (read and replaced by machine, hence the machine index);
// - agg_exposure_cohort: the cohort and home shop each machine was counted under;
// - agg_weather_band_days: per shop and day, the running count of weather days in each temperature band
//   since the shop's first weather day (one array element per band, in the order of shared/bands.ts), so
//   the days of any date range fall in bands by two look-ups;
// - agg_exposure_notable_reading: the repair lines whose hour-meter verdict was unusual (a later meter
//   generation, or set aside) at the last refresh; a load can change a verdict without changing the line;
// - unique indexes on the aggregates' grain, which the difference is merged on.
// The aggregates drop their foreign key to dim_shop: their shop is a machine's home shop, which dim_machine
// already holds to dim_shop, and checking every row was a good part of the time a full rebuild spends writing.
// The refresh state is cleared, so the next refresh rebuilds everything and fills the new tables.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE agg_exposure_machine (
      machine_key  bigint NOT NULL,
      month        date NOT NULL,
      lot          text NOT NULL,
      temp_band    text NOT NULL,
      hour_band    text NOT NULL,
      machine_days integer NOT NULL,
      engine_hours double precision NOT NULL
    )
  `.execute(db);
  await sql`CREATE INDEX agg_exposure_machine_idx ON agg_exposure_machine (machine_key, month)`.execute(db);
  await sql`
    CREATE TABLE agg_exposure_cohort (
      machine_key   bigint PRIMARY KEY,
      engine_family text NOT NULL,
      model_line    text NOT NULL,
      build_month   date NOT NULL,
      shop_key      bigint NOT NULL
    )
  `.execute(db);
  await sql`CREATE INDEX agg_exposure_cohort_shop_idx ON agg_exposure_cohort (shop_key)`.execute(db);
  await sql`
    CREATE TABLE agg_weather_band_days (
      shop_key     bigint NOT NULL,
      date         date NOT NULL,
      days_through integer[] NOT NULL,
      PRIMARY KEY (shop_key, date)
    )
  `.execute(db);
  await sql`
    CREATE TABLE agg_exposure_notable_reading (
      repair_line_key  bigint PRIMARY KEY,
      machine_key      bigint NOT NULL,
      meter_generation integer NOT NULL,
      hour_valid       boolean NOT NULL
    )
  `.execute(db);
  await sql`
    CREATE UNIQUE INDEX agg_exposure_grain_key
    ON agg_exposure (shop_key, month, engine_family, model_line, build_month, lot, temp_band, hour_band)
  `.execute(db);
  await sql`
    CREATE UNIQUE INDEX agg_exposure_fleet_grain_key
    ON agg_exposure_fleet (shop_key, month, engine_family, model_line, temp_band, hour_band)
  `.execute(db);
  for (const t of ["agg_exposure", "agg_exposure_fleet"]) {
    await sql`ALTER TABLE ${sql.table(t)} DROP CONSTRAINT ${sql.raw(`${t}_shop_key_fkey`)}`.execute(db);
  }
  await sql`DELETE FROM agg_refresh WHERE name = 'exposure'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ["agg_exposure", "agg_exposure_fleet"]) {
    await sql`ALTER TABLE ${sql.table(t)} ADD CONSTRAINT ${sql.raw(`${t}_shop_key_fkey`)} FOREIGN KEY (shop_key) REFERENCES dim_shop`.execute(db);
  }
  await sql`DROP INDEX agg_exposure_fleet_grain_key`.execute(db);
  await sql`DROP INDEX agg_exposure_grain_key`.execute(db);
  for (const t of ["agg_exposure_notable_reading", "agg_weather_band_days", "agg_exposure_cohort", "agg_exposure_machine"]) {
    await db.schema.dropTable(t).execute();
  }
}
