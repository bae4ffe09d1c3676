import { sql, type Kysely } from "kysely";

// What a load has to say beyond its counts: header cells its profile did not read (and why), the profile's
// optional columns the file lacked (their stored values were left alone) and lines that a quote left open
// ran together (each then read on its own). Null for batches loaded before.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE etl_batch ADD COLUMN notes jsonb`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE etl_batch DROP COLUMN notes`.execute(db);
}
