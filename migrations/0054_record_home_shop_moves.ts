import { sql, type Kysely } from "kysely";

// A machine that moves to another home shop keeps its history: machine_home_shop holds its home shops over
// time, each valid on the days [valid_from, valid_to) (valid_to null: the current one). A machine has exactly
// one period at a time: consecutive, without gaps, the first one open to the past ('-infinity'), the last one
// open to the future. dim_machine.home_shop_key stays the current home shop, for the pages that show it.
//
// Why the first period starts at -infinity, not at the build or delivery date: whatever shop a machine was
// first known by covers all its days before its first recorded move (machine-days before delivery are not
// counted anyway; a failure line dated before delivery still finds a shop), so no day of a machine is left
// without a home shop, and the first move may be dated any day.
//
// Filled here for the machines already in the warehouse: one period each, from -infinity, at their home shop,
// stamped with the batch that last wrote their master row. From now on the machines merge keeps it
// (etl/load/merge-others.ts): a new machine opens its first period; a machines export naming another home
// shop closes the current period and opens the next on the move's date (the file's home_shop_since, else the
// load date); a move dated on or before the current period's start is rejected.
//
// The exposure shares (agg_exposure_machine) now carry the shop of each day: a machine that moved has rows at
// both shops, so agg_exposure_cohort no longer holds a shop. The shares are emptied and the refresh state
// cleared (as in 0043): the next refresh rebuilds everything with the new column; until then agg_exposure and
// agg_exposure_fleet keep their figures, which are right for a warehouse where no machine has moved yet.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE machine_home_shop (
      machine_key bigint NOT NULL REFERENCES dim_machine ON DELETE CASCADE,
      shop_key    bigint NOT NULL REFERENCES dim_shop,
      valid_from  date NOT NULL,
      valid_to    date,
      batch_id    bigint NOT NULL REFERENCES etl_batch,
      PRIMARY KEY (machine_key, valid_from),
      CHECK (valid_to IS NULL OR valid_to > valid_from)
    )
  `.execute(db);
  // one current period per machine
  await sql`CREATE UNIQUE INDEX machine_home_shop_current_key ON machine_home_shop (machine_key) WHERE valid_to IS NULL`.execute(db);
  // the machines that were at a shop when its weather changed (etl/derived/exposure-changes.ts)
  await sql`CREATE INDEX machine_home_shop_shop_idx ON machine_home_shop (shop_key, valid_from)`.execute(db);
  // the periods a batch opened (the exposure refresh scopes the moved machines by batch)
  await sql`CREATE INDEX machine_home_shop_batch_idx ON machine_home_shop (batch_id)`.execute(db);
  await sql`
    INSERT INTO machine_home_shop (machine_key, shop_key, valid_from, valid_to, batch_id)
    SELECT machine_key, home_shop_key, '-infinity', NULL, batch_id FROM dim_machine WHERE home_shop_key IS NOT NULL
  `.execute(db);

  await sql`TRUNCATE agg_exposure_machine, agg_exposure_cohort`.execute(db);
  await sql`ALTER TABLE agg_exposure_machine ADD COLUMN shop_key bigint NOT NULL`.execute(db);
  await sql`ALTER TABLE agg_exposure_cohort DROP COLUMN shop_key`.execute(db);
  await sql`DELETE FROM agg_refresh WHERE name = 'exposure'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`TRUNCATE agg_exposure_machine, agg_exposure_cohort`.execute(db);
  await sql`ALTER TABLE agg_exposure_cohort ADD COLUMN shop_key bigint NOT NULL`.execute(db);
  await sql`CREATE INDEX agg_exposure_cohort_shop_idx ON agg_exposure_cohort (shop_key)`.execute(db);
  await sql`ALTER TABLE agg_exposure_machine DROP COLUMN shop_key`.execute(db);
  await sql`DELETE FROM agg_refresh WHERE name = 'exposure'`.execute(db);
  await sql`DROP TABLE machine_home_shop`.execute(db);
}
