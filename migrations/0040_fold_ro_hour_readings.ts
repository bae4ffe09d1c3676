import { sql, type Kysely } from "kysely";

// Every repair-order line carries its hour-meter reading already (hour_meter at opened_date); storing it a
// second time as a row of its own doubled the writes of every job load. The line now keeps what the
// hour-meter checks decide about its reading (generation, valid, why not), other readings (delivery,
// hours exports) stay in a table of their own, and fact_hour_reading becomes a view over both, with the
// columns it always had. An RO reading's key is its repair line's key.

const ENGINE_HOURS_VIEW = sql`
  CREATE VIEW v_engine_hours AS
  WITH r AS (
    SELECT machine_key, reading_date, hours, meter_generation
    FROM fact_hour_reading WHERE valid
  ), g AS (
    SELECT machine_key, meter_generation, min(hours) AS first_h, max(hours) AS last_h
    FROM r GROUP BY machine_key, meter_generation
  ), o AS (
    SELECT machine_key, meter_generation,
           coalesce(sum(prev_last - first_h) OVER (PARTITION BY machine_key ORDER BY meter_generation), 0) AS offset_h
    FROM (SELECT g.*, lag(last_h) OVER (PARTITION BY machine_key ORDER BY meter_generation) AS prev_last FROM g) x
  )
  SELECT r.machine_key, r.reading_date, max(r.hours + coalesce(o.offset_h, 0))::double precision AS engine_hours
  FROM r LEFT JOIN o USING (machine_key, meter_generation)
  GROUP BY r.machine_key, r.reading_date
`;

export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    ALTER TABLE fact_repair_line
      ADD COLUMN meter_generation integer NOT NULL DEFAULT 0,
      ADD COLUMN hour_valid boolean NOT NULL DEFAULT true,
      ADD COLUMN hour_invalid_reason text
  `.execute(db);
  await sql`
    UPDATE fact_repair_line f SET meter_generation = r.meter_generation, hour_valid = r.valid, hour_invalid_reason = r.invalid_reason
    FROM fact_hour_reading r WHERE r.source = 'ro' AND r.repair_line_key = f.repair_line_key
  `.execute(db);
  // the few lines whose reading is not the usual verdict (a later meter generation, or set aside)
  await sql`
    CREATE INDEX fact_repair_line_notable_reading_idx ON fact_repair_line (repair_line_key)
    WHERE meter_generation <> 0 OR NOT hour_valid
  `.execute(db);
  await sql`DROP VIEW v_engine_hours`.execute(db);
  await sql`DELETE FROM fact_hour_reading WHERE source = 'ro'`.execute(db);
  await sql`ALTER TABLE fact_hour_reading RENAME TO fact_meter_reading`.execute(db);
  await sql`ALTER INDEX fact_hour_reading_pkey RENAME TO fact_meter_reading_pkey`.execute(db);
  await sql`ALTER INDEX fact_hour_reading_machine_date_idx RENAME TO fact_meter_reading_machine_date_idx`.execute(db);
  await sql`ALTER TABLE fact_meter_reading ADD CONSTRAINT fact_meter_reading_not_ro CHECK (source <> 'ro')`.execute(db);
  await sql`
    CREATE VIEW fact_hour_reading AS
    SELECT hour_reading_key, machine_key, reading_date, hours, source, repair_line_key, meter_change, meter_note,
           meter_generation, valid, invalid_reason, row_hash, batch_id
    FROM fact_meter_reading
    UNION ALL
    SELECT f.repair_line_key, f.machine_key, f.opened_date, f.hour_meter, 'ro', f.repair_line_key, f.meter_note IS NOT NULL, f.meter_note,
           f.meter_generation, f.hour_valid, f.hour_invalid_reason, f.row_hash, f.batch_id
    FROM fact_repair_line f WHERE f.hour_meter IS NOT NULL
  `.execute(db);
  await ENGINE_HOURS_VIEW.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP VIEW v_engine_hours`.execute(db);
  await sql`DROP VIEW fact_hour_reading`.execute(db);
  await sql`ALTER TABLE fact_meter_reading DROP CONSTRAINT fact_meter_reading_not_ro`.execute(db);
  await sql`ALTER INDEX fact_meter_reading_machine_date_idx RENAME TO fact_hour_reading_machine_date_idx`.execute(db);
  await sql`ALTER INDEX fact_meter_reading_pkey RENAME TO fact_hour_reading_pkey`.execute(db);
  await sql`ALTER TABLE fact_meter_reading RENAME TO fact_hour_reading`.execute(db);
  await sql`
    INSERT INTO fact_hour_reading (hour_reading_key, machine_key, reading_date, hours, source, repair_line_key, meter_change, meter_note,
      meter_generation, valid, invalid_reason, row_hash, batch_id)
    SELECT wh_key('hour|ro|' || s.shop_code || '|' || f.ro_number || '|' || f.line_no), f.machine_key, f.opened_date, f.hour_meter, 'ro',
      f.repair_line_key, f.meter_note IS NOT NULL, f.meter_note, f.meter_generation, f.hour_valid, f.hour_invalid_reason,
      md5(f.row_hash), f.batch_id
    FROM fact_repair_line f JOIN dim_shop s USING (shop_key) WHERE f.hour_meter IS NOT NULL
  `.execute(db);
  await sql`DROP INDEX fact_repair_line_notable_reading_idx`.execute(db);
  await sql`ALTER TABLE fact_repair_line DROP COLUMN meter_generation, DROP COLUMN hour_valid, DROP COLUMN hour_invalid_reason`.execute(db);
  await ENGINE_HOURS_VIEW.execute(db);
}
