import { sql, type Kysely } from "kysely";

// v_engine_hours gives the same rows as before, computed with window functions partitioned by machine
// instead of a CTE that is read twice. PostgreSQL materialises a CTE read twice, so a query for a few
// machines (`WHERE machine_key = ANY(…)`) used to read every reading of the warehouse; partitioned by
// machine, the condition reaches the two reading tables and their machine indexes.
//
// Offsets as before: each later meter generation continues from the hours the previous one had reached,
// offset(g) = Σ over generations up to g of (highest reading of the generation before − lowest of this one).
// The first row of each generation carries that generation's step; a running sum over generations adds them.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE OR REPLACE VIEW v_engine_hours AS
    SELECT machine_key, reading_date, max(hours + offset_h)::double precision AS engine_hours
    FROM (
      SELECT machine_key, reading_date, hours,
             coalesce(sum(step) OVER (PARTITION BY machine_key ORDER BY meter_generation), 0) AS offset_h
      FROM (
        SELECT machine_key, reading_date, hours, meter_generation,
               CASE WHEN rn = 1 THEN lag(last_h) OVER (PARTITION BY machine_key ORDER BY meter_generation, rn) - first_h END AS step
        FROM (
          SELECT machine_key, reading_date, hours, meter_generation,
                 min(hours) OVER g AS first_h, max(hours) OVER g AS last_h, row_number() OVER g AS rn
          FROM fact_hour_reading WHERE valid
          WINDOW g AS (PARTITION BY machine_key, meter_generation)
        ) r
      ) s
    ) o
    GROUP BY machine_key, reading_date
  `.execute(db);
}

// The earlier form gives the same rows; migration 0040's down replaces the view whichever form it has.
export async function down(): Promise<void> {}
