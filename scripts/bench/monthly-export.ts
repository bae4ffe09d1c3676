/**
 * A shop's next monthly export for the benchmarks: up to `lines` repair lines of the busiest shop's last
 * month of data, written in the generic jobs layout one month later, with new repair-order numbers (unique to the run) and hour
 * meters past each machine's last reading, so the ETL accepts them as new work on known machines.
 */
import { createWriteStream } from "node:fs";
import { once } from "node:events";
import { stringify } from "csv-stringify";
import type pg from "pg";
import { layouts } from "../../etl/index.js";

export async function writeMonthlyExport(pool: pg.Pool, file: string, lines: number): Promise<{ shop: string; month: string; rows: number }> {
  const last = await pool.query<{ month: string; shop_key: string; shop_code: string }>(`
    WITH m AS (SELECT date_trunc('month', max(opened_date))::date - interval '1 month' AS month FROM fact_repair_line)
    SELECT to_char(m.month, 'YYYY-MM-DD') AS month, f.shop_key::text, s.shop_code
    FROM fact_repair_line f JOIN dim_shop s USING (shop_key), m
    WHERE f.opened_date >= m.month AND f.opened_date < m.month + interval '1 month'
    GROUP BY 1, 2, 3 ORDER BY count(*) DESC LIMIT 1`);
  const { month, shop_key, shop_code } = last.rows[0];
  const rows = await pool.query(
    `SELECT s.shop_code, f.ro_number || $4 AS ro_number, f.line_no, m.serial,
            to_char(f.opened_date + interval '1 month', 'YYYY-MM-DD') AS opened_date,
            to_char(f.closed_date + interval '1 month', 'YYYY-MM-DD') AS closed_date,
            round(coalesce((SELECT r.hours FROM fact_hour_reading r WHERE r.machine_key = f.machine_key AND r.valid
                             ORDER BY r.reading_date DESC, r.hours DESC LIMIT 1), 0) + 60, 1) AS hour_meter,
            NULL AS meter_note, f.complaint, f.cause, f.correction, c.component_code, fm.failure_mode_code AS failure_mode, f.labor_op,
            f.standard_hours, f.labor_hours, f.parts_cost, f.labor_cost, f.pay_type, f.line_type, t.tech_id, f.part_number,
            f.part_description, f.part_qty, f.supplier_lot,
            to_char(f.part_ordered_date + interval '1 month', 'YYYY-MM-DD') AS part_ordered_date,
            to_char(f.part_received_date + interval '1 month', 'YYYY-MM-DD') AS part_received_date,
            CASE WHEN f.back_ordered THEN 'Y' ELSE 'N' END AS back_ordered, NULL AS fault_codes, f.ambient_temp_c AS ambient_temp
     FROM fact_repair_line f
     JOIN dim_shop s USING (shop_key) JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
     LEFT JOIN dim_failure_mode fm USING (failure_mode_key) LEFT JOIN dim_technician t USING (technician_key)
     WHERE f.shop_key = $1 AND f.opened_date >= $2::date AND f.opened_date < $2::date + interval '1 month' AND f.closed_date IS NOT NULL
     ORDER BY f.repair_line_key LIMIT $3`,
    // a suffix of this run's own, so a second run on the same warehouse loads new lines too
    [shop_key, month, lines, `-n${Date.now().toString(36)}`],
  );
  const out = createWriteStream(file);
  const csv = stringify({ header: true, columns: [...layouts.jobs] });
  csv.pipe(out);
  for (const r of rows.rows) if (!csv.write(r)) await once(csv, "drain");
  csv.end();
  await once(out, "finish");
  return { shop: shop_code, month: month.slice(0, 7), rows: rows.rows.length };
}
