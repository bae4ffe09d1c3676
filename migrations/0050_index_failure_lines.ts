import { sql, type Kysely } from "kysely";

// Reads of failure lines (server/db/queries/analytics-base.ts, overview.ts):
// - a failure line is a comeback when an earlier line of the same machine and component closed shortly
//   before it; that test probes (component_key, machine_key, opened_date), which finds the few earlier lines
//   of the one component without reading the machine's other lines. The same order gives each machine's
//   first heater-plug failure without a sort.
// - failure lines are about a sixth of all lines (the rest planned maintenance); two partial indexes hold
//   just them, with the columns the analytics read, so the failure side is an index-only scan: by component
//   and date (rates, clusters, life data) and by shop and date (the overview's machines needing attention).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX fact_repair_line_component_machine_idx ON fact_repair_line (component_key, machine_key, opened_date)`.execute(db);
  await sql`
    CREATE INDEX fact_repair_line_failure_component_idx ON fact_repair_line (component_key, opened_date)
    INCLUDE (machine_key, repair_line_key, hour_meter) WHERE line_type = 'failure'
  `.execute(db);
  await sql`
    CREATE INDEX fact_repair_line_failure_shop_idx ON fact_repair_line (shop_key, opened_date)
    INCLUDE (machine_key, component_key, repair_line_key, hour_meter) WHERE line_type = 'failure'
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX fact_repair_line_failure_shop_idx`.execute(db);
  await sql`DROP INDEX fact_repair_line_failure_component_idx`.execute(db);
  await sql`DROP INDEX fact_repair_line_component_machine_idx`.execute(db);
}
