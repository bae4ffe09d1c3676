import { sql, type Kysely } from "kysely";

// The large facts drop their row-by-row foreign-key checks: the ETL's set-based merges join every fact row
// to its dimensions before inserting it, so integrity is held by the load, and per-row trigger checks cost
// most of a bulk load's time. The small bridge and history tables keep theirs.
const constraints: [string, string[]][] = [
  ["fact_repair_line", ["shop_key", "machine_key", "component_key", "failure_mode_key", "technician_key", "part_key", "first_batch_id", "batch_id"]],
  ["fact_measurement", ["repair_line_key", "machine_key", "shop_key", "batch_id"]],
  ["fact_hour_reading", ["machine_key", "repair_line_key", "batch_id"]],
  ["fact_weather_day", ["shop_key", "batch_id"]],
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const [table, cols] of constraints) {
    for (const c of cols) await sql.raw(`ALTER TABLE ${table} DROP CONSTRAINT IF EXISTS ${table}_${c}_fkey`).execute(db);
  }
}

const targets: Record<string, string> = {
  shop_key: "dim_shop", machine_key: "dim_machine", component_key: "dim_component", failure_mode_key: "dim_failure_mode",
  technician_key: "dim_technician", part_key: "dim_part", first_batch_id: "etl_batch", batch_id: "etl_batch", repair_line_key: "fact_repair_line",
};

export async function down(db: Kysely<any>): Promise<void> {
  for (const [table, cols] of constraints) {
    for (const c of cols) {
      const cascade = table === "fact_hour_reading" && c === "repair_line_key" ? " ON DELETE CASCADE" : "";
      await sql.raw(`ALTER TABLE ${table} ADD CONSTRAINT ${table}_${c}_fkey FOREIGN KEY (${c}) REFERENCES ${targets[c]}${cascade}`).execute(db);
    }
  }
}
