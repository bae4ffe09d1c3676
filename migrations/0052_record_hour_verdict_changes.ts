import { sql, type Kysely } from "kysely";

// A reading that arrives later but is dated earlier can make stored readings after it implausible (lower than
// it, or a rise faster than a day allows since it). The load that brings it re-judges them; each verdict it
// changes is recorded here: which reading, the batch that changed it, and why, so nobody wonders why a
// reading that counted yesterday does not count today.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE hour_verdict_change (
      change_id        bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      hour_reading_key bigint NOT NULL,
      machine_key      bigint NOT NULL,
      reading_date     date NOT NULL,
      hours            numeric(9,1) NOT NULL,
      source           text NOT NULL,
      batch_id         bigint NOT NULL REFERENCES etl_batch (batch_id),
      was_valid        boolean NOT NULL,
      now_valid        boolean NOT NULL,
      reason           text NOT NULL,
      changed_at       timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`CREATE INDEX hour_verdict_change_machine_idx ON hour_verdict_change (machine_key, reading_date)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE hour_verdict_change`.execute(db);
}
