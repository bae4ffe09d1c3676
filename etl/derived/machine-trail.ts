import { sql, type Kysely } from "kysely";

/** Each machine's first and last valid engine hours and first reading date, from v_engine_hours. */
const TRAIL = sql`SELECT machine_key, min(engine_hours), max(engine_hours), min(reading_date) FROM v_engine_hours`;

/**
 * agg_machine_trail brought up to date: every machine (`all`), or those exposure_scope lists for their whole
 * trail — the machines whose readings, repair-line meters or meter verdicts changed (exposure-changes.ts).
 * v_engine_hours partitions by machine, so the scoped form reads only those machines' readings.
 */
export async function refreshMachineTrail(db: Kysely<any>, which: "all" | "scoped"): Promise<void> {
  if (which === "all") {
    await sql`TRUNCATE agg_machine_trail`.execute(db);
    await sql`INSERT INTO agg_machine_trail (machine_key, first_h, last_h, first_d) ${TRAIL} GROUP BY machine_key`.execute(db);
    return;
  }
  // the keys as an array constant: a condition the planner pushes through the view's per-machine windows
  // down to the reading tables' machine indexes (a join to exposure_scope would read every reading)
  const keys = (await sql<{ k: string[] | null }>`SELECT array_agg(machine_key)::text[] AS k FROM exposure_scope WHERE lo = '-infinity'`.execute(db)).rows[0].k;
  if (!keys?.length) return;
  await sql`DELETE FROM agg_machine_trail WHERE machine_key = ANY(${keys}::bigint[])`.execute(db);
  await sql`
    INSERT INTO agg_machine_trail (machine_key, first_h, last_h, first_d)
    ${TRAIL} WHERE machine_key = ANY(${keys}::bigint[]) GROUP BY machine_key
  `.execute(db);
}
