import type pg from "pg";
import { checkHourReadings } from "./hour-checks.js";
import {
  acceptedCount, countChanges, createChanged, registerShops, rejectDuplicates, rejectUnknownMachines, type MergeCounts,
} from "./merge-common.js";

const RL_KEY = `wh_key('repair_line|' || s.shop_code || '|' || s.ro_number || '|' || s.line_no)`;
const HOUR_KEY_TEXT = `'hour|ro|' || s.shop_code || '|' || s.ro_number || '|' || s.line_no`;

const FACT_COLS = [
  "repair_line_key", "shop_key", "ro_number", "line_no", "machine_key", "component_key", "failure_mode_key", "technician_key",
  "part_key", "opened_date", "closed_date", "hour_meter", "meter_note", "complaint", "cause", "correction", "labor_op",
  "standard_hours", "labor_hours", "parts_cost", "labor_cost", "pay_type", "line_type", "part_number", "part_description",
  "part_qty", "supplier_lot", "part_ordered_date", "part_received_date", "back_ordered", "fault_codes_raw", "ambient_temp_c",
  "row_hash", "first_batch_id", "batch_id",
];
const UPDATABLE = FACT_COLS.filter((c) => !["repair_line_key", "shop_key", "ro_number", "line_no", "first_batch_id"].includes(c));

/** Repair-order lines: checks against the warehouse, dimension upserts, the fact merge with history, fault codes, hour readings. */
export async function mergeJobs(client: pg.PoolClient, batchId: number): Promise<MergeCounts> {
  await rejectDuplicates(client, ["shop_code", "ro_number", "line_no"], "shop %s repair order %s line %s");
  await rejectUnknownMachines(client);
  await checkHourReadings(client, { dateCol: "opened_date", hoursCol: "hour_meter", keyText: HOUR_KEY_TEXT });
  await registerShops(client, "shop_code");

  await client.query(
    `INSERT INTO dim_technician (technician_key, shop_key, tech_id, display_name)
     SELECT DISTINCT wh_key('technician|' || s.shop_code || '|' || s.tech_id), sh.shop_key, s.tech_id, s.tech_id
     FROM stg s JOIN dim_shop sh ON sh.shop_code = s.shop_code
     WHERE s.reject_code IS NULL AND s.tech_id IS NOT NULL
     ON CONFLICT (technician_key) DO NOTHING`,
  );
  await client.query(
    `INSERT INTO dim_part (part_key, part_number, supplier_lot, description)
     SELECT wh_key('part|' || part_number || '|' || lot), part_number, lot, min(part_description)
     FROM (SELECT part_number, COALESCE(supplier_lot, '') AS lot, part_description FROM stg
           WHERE reject_code IS NULL AND part_number IS NOT NULL) p
     GROUP BY part_number, lot
     ON CONFLICT (part_key) DO NOTHING`,
  );

  const accepted = await acceptedCount(client);
  await createChanged(client);
  const src = `SELECT ${RL_KEY} AS repair_line_key, sh.shop_key, s.ro_number, s.line_no, m.machine_key, c.component_key,
         CASE WHEN s.failure_mode IS NULL THEN NULL ELSE wh_key('failure_mode|' || s.failure_mode) END AS failure_mode_key,
         CASE WHEN s.tech_id IS NULL THEN NULL ELSE wh_key('technician|' || s.shop_code || '|' || s.tech_id) END AS technician_key,
         CASE WHEN s.part_number IS NULL THEN NULL ELSE wh_key('part|' || s.part_number || '|' || COALESCE(s.supplier_lot, '')) END AS part_key,
         s.opened_date, s.closed_date, s.hour_meter, s.meter_note, s.complaint, s.cause, s.correction, s.labor_op,
         s.standard_hours, s.labor_hours, s.parts_cost, s.labor_cost, s.pay_type, s.line_type, s.part_number, s.part_description,
         s.part_qty, s.supplier_lot, s.part_ordered_date, s.part_received_date, s.back_ordered, s.fault_codes AS fault_codes_raw,
         s.ambient_temp_c, s.row_hash, $1::bigint AS first_batch_id, $1::bigint AS batch_id
       FROM stg s
       JOIN dim_shop sh ON sh.shop_code = s.shop_code
       JOIN dim_machine m ON m.serial = s.serial
       JOIN dim_component c ON c.component_code = s.component_code
       WHERE s.reject_code IS NULL`;
  // prior versions first (same snapshot as the update that follows), then update changed rows, then insert new ones
  await client.query(
    `INSERT INTO fact_repair_line_history (repair_line_key, prior_row, prior_batch_id, replaced_by_batch)
     SELECT f.repair_line_key, to_jsonb(f), f.batch_id, $1
     FROM fact_repair_line f JOIN stg s ON f.repair_line_key = ${RL_KEY}
     WHERE s.reject_code IS NULL AND f.row_hash <> s.row_hash`,
    [batchId],
  );
  await client.query(
    `WITH up AS (
       UPDATE fact_repair_line f SET ${UPDATABLE.map((c) => `${c} = x.${c}`).join(", ")}
       FROM (${src}) x
       WHERE f.repair_line_key = x.repair_line_key AND f.row_hash <> x.row_hash
       RETURNING f.repair_line_key
     )
     INSERT INTO changed SELECT repair_line_key, false FROM up`,
    [batchId],
  );
  await client.query(
    `WITH ins AS (
       INSERT INTO fact_repair_line (${FACT_COLS.join(", ")})
       SELECT ${FACT_COLS.join(", ")} FROM (${src}) x
       WHERE NOT EXISTS (SELECT 1 FROM fact_repair_line f WHERE f.repair_line_key = x.repair_line_key)
       RETURNING repair_line_key
     )
     INSERT INTO changed SELECT repair_line_key, true FROM ins`,
    [batchId],
  );

  await client.query(`DELETE FROM fact_fault_code WHERE repair_line_key IN (SELECT key FROM changed WHERE NOT inserted)`);
  await client.query(
    `INSERT INTO fact_fault_code (repair_line_key, spn, fmi, occurrences)
     SELECT k, split_part(item, ':', 1)::integer, split_part(item, ':', 2)::smallint, sum(split_part(item, ':', 3)::integer)
     FROM (SELECT ${RL_KEY} AS k, s.fault_codes FROM stg s WHERE s.reject_code IS NULL AND s.fault_codes IS NOT NULL) f
     JOIN changed ch ON ch.key = f.k, unnest(string_to_array(f.fault_codes, ';')) AS item
     GROUP BY 1, 2, 3`,
  );

  const readings = `SELECT wh_key(${HOUR_KEY_TEXT}) AS hour_reading_key, h.machine_key, s.opened_date AS reading_date, s.hour_meter AS hours,
       'ro' AS source, ${RL_KEY} AS repair_line_key, s.meter_change, s.meter_note, h.generation AS meter_generation, h.valid, h.invalid_reason,
       md5(concat_ws('|', s.serial, s.opened_date, s.hour_meter, s.meter_note, h.generation, h.valid)) AS row_hash, $1::bigint AS batch_id
     FROM stg s JOIN hr_out h ON h.row_no = s.row_no
     WHERE s.reject_code IS NULL`;
  const HR_COLS = ["hour_reading_key", "machine_key", "reading_date", "hours", "source", "repair_line_key", "meter_change", "meter_note",
    "meter_generation", "valid", "invalid_reason", "row_hash", "batch_id"];
  await client.query(
    `UPDATE fact_hour_reading r SET ${HR_COLS.slice(1).map((c) => `${c} = x.${c}`).join(", ")}
     FROM (${readings}) x WHERE r.hour_reading_key = x.hour_reading_key AND r.row_hash <> x.row_hash`,
    [batchId],
  );
  await client.query(
    `INSERT INTO fact_hour_reading (${HR_COLS.join(", ")})
     SELECT ${HR_COLS.join(", ")} FROM (${readings}) x
     WHERE NOT EXISTS (SELECT 1 FROM fact_hour_reading r WHERE r.hour_reading_key = x.hour_reading_key)`,
    [batchId],
  );
  return countChanges(client, accepted);
}
