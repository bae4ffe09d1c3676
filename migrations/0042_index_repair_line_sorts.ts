import { sql, type Kysely } from "kysely";

// The repairs list is read by keyset: each sort is a tuple in one direction that ends in the unique
// repair_line_key, and a page starts where the last one ended. A sort on a repair-line column gets a btree
// index on its whole tuple (read backwards for a descending sort); a nullable column is indexed as
// coalesce(column, ±infinity) once per direction, so its empty cells come last either way and the tuple
// has no NULL to break a row comparison; pay and line type are followed by the opening date. Sorts led by a
// shop, machine or component walk those rows in order (machines through the two dim_machine indexes below)
// and read each one's lines through the fact's existing (…_key, opened_date) index.
const FACT_SORTS: [name: string, columns: string][] = [
  ["opened", "opened_date, ro_number, line_no, repair_line_key"],
  ["ro", "ro_number, line_no, repair_line_key"],
  ["pay_type", "pay_type, opened_date, ro_number, line_no, repair_line_key"],
  ["line_type", "line_type, opened_date, ro_number, line_no, repair_line_key"],
  ["closed_up", "coalesce(closed_date, 'infinity'::date), ro_number, line_no, repair_line_key"],
  ["closed_down", "coalesce(closed_date, '-infinity'::date), ro_number, line_no, repair_line_key"],
  ["hours_up", "coalesce(hour_meter, 'Infinity'::numeric), ro_number, line_no, repair_line_key"],
  ["hours_down", "coalesce(hour_meter, '-Infinity'::numeric), ro_number, line_no, repair_line_key"],
  ["labor_up", "coalesce(labor_hours, 'Infinity'::numeric), ro_number, line_no, repair_line_key"],
  ["labor_down", "coalesce(labor_hours, '-Infinity'::numeric), ro_number, line_no, repair_line_key"],
];
const MACHINE_SORTS: [name: string, columns: string][] = [
  ["model_line", "model_line, machine_key"],
  ["engine_family", "engine_family, machine_key"],
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const [name, columns] of FACT_SORTS) {
    await sql`CREATE INDEX ${sql.raw(`fact_repair_line_sort_${name}_idx`)} ON fact_repair_line (${sql.raw(columns)})`.execute(db);
  }
  for (const [name, columns] of MACHINE_SORTS) {
    await sql`CREATE INDEX ${sql.raw(`dim_machine_sort_${name}_idx`)} ON dim_machine (${sql.raw(columns)})`.execute(db);
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const [name] of MACHINE_SORTS) await sql`DROP INDEX ${sql.raw(`dim_machine_sort_${name}_idx`)}`.execute(db);
  for (const [name] of FACT_SORTS) await sql`DROP INDEX ${sql.raw(`fact_repair_line_sort_${name}_idx`)}`.execute(db);
}
