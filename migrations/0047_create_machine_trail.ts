import { sql, type Kysely } from "kysely";

// agg_machine_trail: each machine's engine-hour trail summed up — the first and last valid engine hours
// (after meter-change offsets, as v_engine_hours gives them) and the first reading date. Life curves and the
// mean cumulative function need exactly these three figures per machine; computing them per request meant
// sorting every hour reading of the warehouse (10–13 s at a million job lines). The exposure refresh keeps
// the table current for the machines a load touched (etl/derived/machine-trail.ts); filled here once.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE agg_machine_trail (
      machine_key bigint PRIMARY KEY,
      first_h     double precision NOT NULL,
      last_h      double precision NOT NULL,
      first_d     date NOT NULL
    )
  `.execute(db);
  await sql`
    INSERT INTO agg_machine_trail (machine_key, first_h, last_h, first_d)
    SELECT machine_key, min(engine_hours), max(engine_hours), min(reading_date) FROM v_engine_hours GROUP BY machine_key
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("agg_machine_trail").execute();
}
