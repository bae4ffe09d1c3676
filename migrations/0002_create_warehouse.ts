import { sql, type Kysely } from "kysely";

// The star schema: dimensions dim_*, facts fact_*, ETL bookkeeping etl_*.
//
// Keys. Every surrogate key is a deterministic bigint hash of the natural key (wh_key below), so loading
// the same exports in any order yields identical keys and the ETL can merge set-wise without lookups.
// Facts carry their business date (opened_date, reading_date, …) as a plain date column; when the
// performance work partitions a fact by date, its primary key becomes (key, date) and the natural-key
// uniqueness stays guaranteed by the deterministic key the ETL computes.

const FMI: [number, string][] = [
  [0, "Data valid but above normal operational range – most severe level"],
  [1, "Data valid but below normal operational range – most severe level"],
  [2, "Data erratic, intermittent or incorrect"],
  [3, "Voltage above normal, or shorted to high source"],
  [4, "Voltage below normal, or shorted to low source"],
  [5, "Current below normal or open circuit"],
  [6, "Current above normal or grounded circuit"],
  [7, "Mechanical system not responding or out of adjustment"],
  [8, "Abnormal frequency or pulse width or period"],
  [9, "Abnormal update rate"],
  [10, "Abnormal rate of change"],
  [11, "Root cause not known"],
  [12, "Bad intelligent device or component"],
  [13, "Out of calibration"],
  [14, "Special instructions"],
  [15, "Data valid but above normal operating range – least severe level"],
  [16, "Data valid but above normal operating range – moderately severe level"],
  [17, "Data valid but below normal operating range – least severe level"],
  [18, "Data valid but below normal operating range – moderately severe level"],
  [19, "Received network data in error"],
  [20, "Data drifted high"],
  [21, "Data drifted low"],
  ...Array.from({ length: 9 }, (_, i): [number, string] => [22 + i, "Reserved for SAE assignment"]),
  [31, "Condition exists"],
];

export async function up(db: Kysely<any>): Promise<void> {
  // 64-bit key from the first 16 hex digits of md5(natural key); collisions are negligible at warehouse sizes.
  await sql`
    CREATE FUNCTION wh_key(natural_key text) RETURNS bigint
    LANGUAGE sql IMMUTABLE STRICT PARALLEL SAFE
    AS $$ SELECT ('x' || substr(md5(natural_key), 1, 16))::bit(64)::bigint $$
  `.execute(db);

  await sql`
    CREATE TABLE etl_batch (
      batch_id       bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      file_name      text NOT NULL,
      sha256         text NOT NULL CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      profile        text NOT NULL,
      kind           text NOT NULL CHECK (kind IN ('machines','jobs','measurements','weather','hours')),
      shop_code      text,
      loaded_by      text NOT NULL,
      started_at     timestamptz NOT NULL DEFAULT now(),
      finished_at    timestamptz,
      rows_read      integer NOT NULL DEFAULT 0,
      rows_inserted  integer NOT NULL DEFAULT 0,
      rows_updated   integer NOT NULL DEFAULT 0,
      rows_unchanged integer NOT NULL DEFAULT 0,
      rows_rejected  integer NOT NULL DEFAULT 0,
      status         text NOT NULL DEFAULT 'running' CHECK (status IN ('running','loaded','already_loaded','failed')),
      error_message  text,
      CONSTRAINT etl_batch_counts_add_up CHECK (
        finished_at IS NULL
        OR rows_read = rows_inserted + rows_updated + rows_unchanged + rows_rejected
      )
    )
  `.execute(db);
  // one successful load per file content; repeats are recorded as 'already_loaded'
  await sql`CREATE UNIQUE INDEX etl_batch_loaded_sha256_key ON etl_batch (sha256) WHERE status = 'loaded'`.execute(db);
  await sql`CREATE INDEX etl_batch_started_idx ON etl_batch (started_at)`.execute(db);

  await sql`
    CREATE TABLE etl_reject (
      batch_id    bigint NOT NULL REFERENCES etl_batch ON DELETE CASCADE,
      row_number  integer NOT NULL,
      raw_row     jsonb NOT NULL,
      reason_code text NOT NULL,
      reason      text NOT NULL,
      PRIMARY KEY (batch_id, row_number)
    )
  `.execute(db);
  await sql`CREATE INDEX etl_reject_reason_idx ON etl_reject (reason_code)`.execute(db);

  await sql`
    CREATE TABLE dim_date (
      date           date PRIMARY KEY,
      iso_year       smallint NOT NULL,
      iso_week       smallint NOT NULL,
      year           smallint NOT NULL,
      quarter        smallint NOT NULL,
      month          smallint NOT NULL,
      month_label    text NOT NULL,
      day_of_week    smallint NOT NULL,
      winter_season  text NOT NULL
    )
  `.execute(db);

  await sql`
    CREATE TABLE dim_shop (
      shop_key        bigint PRIMARY KEY,
      shop_code       text NOT NULL UNIQUE,
      name            text NOT NULL,
      region          text,
      town            text,
      lat             double precision,
      lon             double precision,
      climate_zone    text,
      time_zone       text,
      weather_station text,
      export_profile  text
    )
  `.execute(db);

  await sql`
    CREATE TABLE dim_component (
      component_key  bigint PRIMARY KEY,
      component_code text NOT NULL UNIQUE,
      name           text NOT NULL,
      system         text NOT NULL,
      assembly       text NOT NULL,
      cold_start_aid boolean NOT NULL DEFAULT false
    )
  `.execute(db);
  await sql`CREATE INDEX dim_component_hierarchy_idx ON dim_component (system, assembly)`.execute(db);

  await sql`
    CREATE TABLE dim_failure_mode (
      failure_mode_key  bigint PRIMARY KEY,
      failure_mode_code text NOT NULL UNIQUE,
      name              text NOT NULL
    )
  `.execute(db);

  await sql`
    CREATE TABLE dim_fmi (
      fmi     smallint PRIMARY KEY CHECK (fmi BETWEEN 0 AND 31),
      meaning text NOT NULL
    )
  `.execute(db);
  await db.insertInto("dim_fmi").values(FMI.map(([fmi, meaning]) => ({ fmi, meaning }))).execute();

  await sql`
    CREATE TABLE dim_machine (
      machine_key            bigint PRIMARY KEY,
      serial                 text NOT NULL UNIQUE,
      model_code             text NOT NULL,
      model_line             text NOT NULL,
      engine_family          text NOT NULL,
      cold_start_aid         text NOT NULL CHECK (cold_start_aid IN ('glow_plugs','grid_heater','none')),
      engine_serial          text,
      build_date             date,
      delivery_date          date,
      delivery_hours         numeric(9,1),
      home_shop_key          bigint REFERENCES dim_shop,
      heater_plug_lot        text,
      block_heater_fitted    boolean NOT NULL DEFAULT false,
      block_heater_date      date,
      warranty_base_months   smallint,
      warranty_base_hours    integer,
      warranty_engine_months smallint,
      warranty_engine_hours  integer,
      row_hash               text NOT NULL,
      batch_id               bigint NOT NULL REFERENCES etl_batch
    )
  `.execute(db);
  await sql`CREATE INDEX dim_machine_model_idx ON dim_machine (engine_family, build_date)`.execute(db);
  await sql`CREATE INDEX dim_machine_home_shop_idx ON dim_machine (home_shop_key)`.execute(db);
  await sql`CREATE INDEX dim_machine_lot_idx ON dim_machine (heater_plug_lot)`.execute(db);

  await sql`
    CREATE TABLE dim_technician (
      technician_key bigint PRIMARY KEY,
      shop_key       bigint NOT NULL REFERENCES dim_shop,
      tech_id        text NOT NULL,
      display_name   text NOT NULL,
      UNIQUE (shop_key, tech_id)
    )
  `.execute(db);

  await sql`
    CREATE TABLE dim_part (
      part_key     bigint PRIMARY KEY,
      part_number  text NOT NULL,
      supplier_lot text NOT NULL DEFAULT '',
      description  text,
      supplier     text,
      UNIQUE (part_number, supplier_lot)
    )
  `.execute(db);
  await sql`CREATE INDEX dim_part_lot_idx ON dim_part (supplier_lot) WHERE supplier_lot <> ''`.execute(db);

  await sql`
    CREATE TABLE fact_repair_line (
      repair_line_key    bigint PRIMARY KEY,
      shop_key           bigint NOT NULL REFERENCES dim_shop,
      ro_number          text NOT NULL,
      line_no            integer NOT NULL,
      machine_key        bigint NOT NULL REFERENCES dim_machine,
      component_key      bigint NOT NULL REFERENCES dim_component,
      failure_mode_key   bigint REFERENCES dim_failure_mode,
      technician_key     bigint REFERENCES dim_technician,
      part_key           bigint REFERENCES dim_part,
      opened_date        date NOT NULL,
      closed_date        date,
      hour_meter         numeric(9,1),
      meter_note         text,
      complaint          text,
      cause              text,
      correction         text,
      labor_op           text,
      standard_hours     numeric(7,2),
      labor_hours        numeric(7,2),
      parts_cost         numeric(12,2),
      labor_cost         numeric(12,2),
      pay_type           text NOT NULL CHECK (pay_type IN ('customer','warranty','internal','goodwill')),
      is_warranty        boolean GENERATED ALWAYS AS (pay_type = 'warranty') STORED,
      line_type          text NOT NULL CHECK (line_type IN ('failure','pm','return_for_parts','install')),
      part_number        text,
      part_description   text,
      part_qty           numeric(9,2),
      supplier_lot       text,
      part_ordered_date  date,
      part_received_date date,
      back_ordered       boolean NOT NULL DEFAULT false,
      parts_wait_days    integer GENERATED ALWAYS AS (part_received_date - part_ordered_date) STORED,
      fault_codes_raw    text,
      ambient_temp_c     numeric(5,1),
      row_hash           text NOT NULL,
      first_batch_id     bigint NOT NULL REFERENCES etl_batch,
      batch_id           bigint NOT NULL REFERENCES etl_batch,
      UNIQUE (shop_key, ro_number, line_no),
      CHECK (closed_date IS NULL OR closed_date >= opened_date)
    )
  `.execute(db);
  await sql`CREATE INDEX fact_repair_line_component_date_idx ON fact_repair_line (component_key, opened_date)`.execute(db);
  await sql`CREATE INDEX fact_repair_line_machine_date_idx ON fact_repair_line (machine_key, opened_date)`.execute(db);
  await sql`CREATE INDEX fact_repair_line_shop_date_idx ON fact_repair_line (shop_key, opened_date)`.execute(db);
  await sql`CREATE INDEX fact_repair_line_lot_idx ON fact_repair_line (supplier_lot) WHERE supplier_lot IS NOT NULL`.execute(db);

  await sql`
    CREATE TABLE fact_repair_line_history (
      history_id         bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      repair_line_key    bigint NOT NULL REFERENCES fact_repair_line ON DELETE CASCADE,
      prior_row          jsonb NOT NULL,
      prior_batch_id     bigint NOT NULL REFERENCES etl_batch,
      replaced_by_batch  bigint NOT NULL REFERENCES etl_batch,
      replaced_at        timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`CREATE INDEX fact_repair_line_history_line_idx ON fact_repair_line_history (repair_line_key)`.execute(db);

  await sql`
    CREATE TABLE fact_fault_code (
      repair_line_key bigint NOT NULL REFERENCES fact_repair_line ON DELETE CASCADE,
      spn             integer NOT NULL CHECK (spn BETWEEN 0 AND 524287),
      fmi             smallint NOT NULL REFERENCES dim_fmi,
      occurrences     integer NOT NULL DEFAULT 1,
      PRIMARY KEY (repair_line_key, spn, fmi)
    )
  `.execute(db);
  await sql`CREATE INDEX fact_fault_code_spn_idx ON fact_fault_code (spn, fmi)`.execute(db);

  await sql`
    CREATE TABLE fact_measurement (
      measurement_key  bigint PRIMARY KEY,
      repair_line_key  bigint NOT NULL REFERENCES fact_repair_line,
      machine_key      bigint NOT NULL REFERENCES dim_machine,
      shop_key         bigint NOT NULL REFERENCES dim_shop,
      measured_date    date NOT NULL,
      kind             text NOT NULL CHECK (kind IN ('compression','plug_resistance','rail_voltage','battery_voltage')),
      position         smallint NOT NULL DEFAULT 0,
      attempt          smallint NOT NULL DEFAULT 1,
      value            numeric(12,4),
      unit             text NOT NULL,
      over_range       boolean NOT NULL DEFAULT false,
      raw_value        text NOT NULL,
      raw_unit         text,
      conversion_rule  text NOT NULL,
      row_hash         text NOT NULL,
      batch_id         bigint NOT NULL REFERENCES etl_batch,
      UNIQUE (repair_line_key, kind, position, attempt),
      CHECK (value IS NOT NULL OR over_range)
    )
  `.execute(db);
  await sql`CREATE INDEX fact_measurement_kind_date_idx ON fact_measurement (kind, measured_date)`.execute(db);
  await sql`CREATE INDEX fact_measurement_machine_idx ON fact_measurement (machine_key, measured_date)`.execute(db);

  await sql`
    CREATE TABLE fact_hour_reading (
      hour_reading_key bigint PRIMARY KEY,
      machine_key      bigint NOT NULL REFERENCES dim_machine,
      reading_date     date NOT NULL,
      hours            numeric(9,1) NOT NULL CHECK (hours >= 0),
      source           text NOT NULL CHECK (source IN ('delivery','ro','pm','telematics','registry')),
      repair_line_key  bigint REFERENCES fact_repair_line ON DELETE CASCADE,
      meter_change     boolean NOT NULL DEFAULT false,
      meter_note       text,
      valid            boolean NOT NULL DEFAULT true,
      invalid_reason   text,
      row_hash         text NOT NULL,
      batch_id         bigint NOT NULL REFERENCES etl_batch
    )
  `.execute(db);
  await sql`CREATE INDEX fact_hour_reading_machine_date_idx ON fact_hour_reading (machine_key, reading_date)`.execute(db);

  await sql`
    CREATE TABLE fact_weather_day (
      shop_key    bigint NOT NULL REFERENCES dim_shop,
      date        date NOT NULL,
      tmin_c      numeric(5,1) NOT NULL,
      tmax_c      numeric(5,1),
      source_unit text NOT NULL CHECK (source_unit IN ('C','F')),
      row_hash    text NOT NULL,
      batch_id    bigint NOT NULL REFERENCES etl_batch,
      PRIMARY KEY (shop_key, date),
      CHECK (tmax_c IS NULL OR tmax_c >= tmin_c)
    )
  `.execute(db);
  await sql`CREATE INDEX fact_weather_day_date_idx ON fact_weather_day (date)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    "fact_weather_day", "fact_hour_reading", "fact_measurement", "fact_fault_code", "fact_repair_line_history",
    "fact_repair_line", "dim_part", "dim_technician", "dim_machine", "dim_fmi", "dim_failure_mode", "dim_component",
    "dim_shop", "dim_date", "etl_reject", "etl_batch",
  ]) {
    await db.schema.dropTable(t).execute();
  }
  await sql`DROP FUNCTION wh_key(text)`.execute(db);
}
