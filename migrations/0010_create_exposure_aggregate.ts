import { sql, type Kysely } from "kysely";

// Derived exposure: machine-days and estimated engine hours per machine cohort × home shop × month ×
// daily-minimum temperature band × engine-hour band. Rebuilt after every load (server/db/derived).
// A view of failure lines with the same dimensions sits beside it.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE agg_exposure (
      engine_family text NOT NULL,
      model_line    text NOT NULL,
      build_month   date NOT NULL,
      lot           text NOT NULL,
      shop_key      bigint NOT NULL REFERENCES dim_shop,
      month         date NOT NULL,
      temp_band     text NOT NULL,
      hour_band     text NOT NULL,
      machines      integer NOT NULL,
      machine_days  integer NOT NULL,
      engine_hours  double precision NOT NULL
    )
  `.execute(db);
  await sql`CREATE INDEX agg_exposure_cohort_idx ON agg_exposure (engine_family, build_month, lot)`.execute(db);
  await sql`CREATE INDEX agg_exposure_shop_month_idx ON agg_exposure (shop_key, month)`.execute(db);

  await sql`
    CREATE TABLE agg_refresh (
      name         text PRIMARY KEY,
      refreshed_at timestamptz NOT NULL,
      last_batch   bigint,
      rows         integer NOT NULL,
      seconds      double precision NOT NULL
    )
  `.execute(db);

  // Engine hours continue across meter generations: each later generation is offset by the hours the
  // previous meters had reached (last reading of a generation minus first reading of the next).
  await sql`
    CREATE VIEW v_engine_hours AS
    WITH r AS (
      SELECT machine_key, reading_date, hours, meter_generation
      FROM fact_hour_reading WHERE valid
    ), g AS (
      SELECT machine_key, meter_generation, min(hours) AS first_h, max(hours) AS last_h
      FROM r GROUP BY machine_key, meter_generation
    ), o AS (
      SELECT machine_key, meter_generation,
             coalesce(sum(prev_last - first_h) OVER (PARTITION BY machine_key ORDER BY meter_generation), 0) AS offset_h
      FROM (SELECT g.*, lag(last_h) OVER (PARTITION BY machine_key ORDER BY meter_generation) AS prev_last FROM g) x
    )
    SELECT r.machine_key, r.reading_date, max(r.hours + coalesce(o.offset_h, 0))::double precision AS engine_hours
    FROM r LEFT JOIN o USING (machine_key, meter_generation)
    GROUP BY r.machine_key, r.reading_date
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP VIEW v_engine_hours`.execute(db);
  await sql`DROP TABLE agg_refresh`.execute(db);
  await sql`DROP TABLE agg_exposure`.execute(db);
}
