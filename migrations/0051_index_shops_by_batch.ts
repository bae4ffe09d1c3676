import { sql, type Kysely } from "kysely";

// The overview's latest loads name the one shop a batch wrote (repair lines, measurements, weather) when the
// batch carries no shop code. With the shop key beside the batch id in an index, the lowest and highest shop a
// batch wrote are two index look-ups per table instead of a grouping of every fact row. A repair line keeps
// the batch that first wrote it (first_batch_id) and the last one that changed it (batch_id); the second
// differs from the first only on the few lines a later export changed, so that index is partial.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX fact_repair_line_first_batch_shop_idx ON fact_repair_line (first_batch_id, shop_key)`.execute(db);
  await sql`
    CREATE INDEX fact_repair_line_changed_batch_shop_idx ON fact_repair_line (batch_id, shop_key)
    WHERE batch_id <> first_batch_id
  `.execute(db);
  await sql`CREATE INDEX fact_measurement_batch_shop_idx ON fact_measurement (batch_id, shop_key)`.execute(db);
  await sql`CREATE INDEX fact_weather_day_batch_shop_idx ON fact_weather_day (batch_id, shop_key)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const i of ["fact_weather_day_batch_shop_idx", "fact_measurement_batch_shop_idx", "fact_repair_line_changed_batch_shop_idx", "fact_repair_line_first_batch_shop_idx"]) {
    await sql`DROP INDEX ${sql.raw(i)}`.execute(db);
  }
}
