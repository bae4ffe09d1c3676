import { sql, type Kysely } from "kysely";

// A replaced or reset meter starts a new generation; hour readings are compared only within one.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE fact_hour_reading ADD COLUMN meter_generation integer NOT NULL DEFAULT 0`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE fact_hour_reading DROP COLUMN meter_generation`.execute(db);
}
