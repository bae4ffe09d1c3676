import { sql, type Kysely } from "kysely";

// agg_exposure summed over build month and lot: the smaller table answers rate queries that do not
// filter by build cohort or lot. Rebuilt with agg_exposure.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE agg_exposure_fleet (
      engine_family text NOT NULL,
      model_line    text NOT NULL,
      shop_key      bigint NOT NULL REFERENCES dim_shop,
      month         date NOT NULL,
      temp_band     text NOT NULL,
      hour_band     text NOT NULL,
      machine_days  integer NOT NULL,
      engine_hours  double precision NOT NULL
    )
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE agg_exposure_fleet`.execute(db);
}
