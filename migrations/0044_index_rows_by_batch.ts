import { sql, type Kysely } from "kysely";

// The exposure refresh asks which rows the batches since its last run wrote (batch_id is set on insert and
// on every change of content). These indexes answer that without reading the tables; batch ids only grow,
// so new entries land at the right-hand edge of each index.
const TABLES = ["fact_repair_line", "fact_meter_reading", "fact_weather_day", "dim_machine"];

export async function up(db: Kysely<any>): Promise<void> {
  for (const t of TABLES) await sql`CREATE INDEX ${sql.raw(`${t}_batch_idx`)} ON ${sql.table(t)} (batch_id)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of TABLES) await sql`DROP INDEX ${sql.raw(`${t}_batch_idx`)}`.execute(db);
}
