// Table interfaces for the star schema (dimensions dim_*, facts fact_*, ETL bookkeeping etl_*).
// Kept in step with migrations/0002_create_warehouse.ts. Driver types (server/db/database.ts):
// numeric → string, bigint → string (keys are 64-bit hashes beyond 2^53), date → 'YYYY-MM-DD' string, timestamptz → Date.
import type { ColumnType, Generated } from "kysely";

/** pg numeric arrives as a string; accept numbers on write. */
type Numeric = ColumnType<string, string | number, string | number>;
type NullableNumeric = ColumnType<string | null, string | number | null | undefined, string | number | null>;
/** pg bigint arrives as a string (keys are 64-bit hashes beyond 2^53); numbers are accepted on write. */
type Bigint = ColumnType<string, string | number, string | number>;
type NullableBigint = ColumnType<string | null, string | number | null | undefined, string | number | null>;
/** Columns computed by PostgreSQL (GENERATED ALWAYS … STORED): readable, never written. */
type Computed<T> = ColumnType<T, never, never>;

export type ExportKindColumn = "machines" | "jobs" | "measurements" | "weather" | "hours";
export type BatchStatus = "running" | "loaded" | "already_loaded" | "failed";
export type HourSource = "delivery" | "ro" | "pm" | "telematics" | "registry" | "sheet";
export type MeasurementKindColumn =
  | "compression" | "plug_resistance" | "rail_voltage" | "battery_voltage" | "ambient_temperature" | "engine_state" | "preheat_lamp" | "bench_test";
/** Where a batch's file came from: a shop's export, or a bench sheet the server wrote (migration 0068). */
export type BatchSource = "export" | "sheet";

export interface EtlBatchTable {
  batch_id: Generated<string>;
  file_name: string;
  sha256: string;
  profile: string;
  kind: ExportKindColumn;
  shop_code: string | null;
  loaded_by: string;
  started_at: ColumnType<Date, Date | undefined, Date>;
  finished_at: Date | null;
  rows_read: Generated<number>;
  rows_inserted: Generated<number>;
  rows_updated: Generated<number>;
  rows_unchanged: Generated<number>;
  rows_rejected: Generated<number>;
  status: Generated<BatchStatus>;
  error_message: string | null;
  /** header cells ignored, optional columns absent, merged lines (etl/load/load-file.ts BatchSummary) */
  notes: unknown;
  /** the version of the profile the batch was read with (etl_profile_version); null before profiles were versioned */
  profile_version: number | null;
  source: Generated<BatchSource>;
}

/** A saved version of a mapping profile (etl/profiles/profile-store.ts). */
export interface EtlProfileVersionTable {
  profile_id: string;
  version: number;
  kind: ExportKindColumn;
  body: unknown;
  saved_by: string;
  saved_at: Generated<Date>;
  note: string | null;
}

export interface HourVerdictChangeTable {
  change_id: Generated<string>;
  hour_reading_key: Bigint;
  machine_key: Bigint;
  reading_date: string;
  hours: Numeric;
  source: string;
  batch_id: Bigint;
  was_valid: boolean;
  now_valid: boolean;
  reason: string;
  changed_at: Generated<Date>;
}

export interface EtlUploadTable {
  upload_id: Generated<string>;
  file_name: string;
  size_bytes: Bigint;
  sha256: string;
  object_key: string | null;
  spool_path: string;
  uploaded_by: string;
  uploaded_by_sub: string;
  uploaded_at: Generated<Date>;
  scope_shops: string[] | null;
  kind: ExportKindColumn | null;
  profile: string | null;
  shop_code: string | null;
  status: Generated<"checking" | "ready" | "refused" | "queued" | "loading" | "loaded" | "failed" | "cancelled">;
  message: string | null;
  preview: unknown;
  progress: unknown;
  batch_id: Bigint | null;
  cancel_requested: Generated<boolean>;
  updated_at: Generated<Date>;
}

export interface EtlRejectTable {
  batch_id: Bigint;
  row_number: number;
  raw_row: unknown;
  reason_code: string;
  reason: string;
}

export interface DimDateTable {
  date: string;
  iso_year: number;
  iso_week: number;
  year: number;
  quarter: number;
  month: number;
  /** 'YYYY-MM' */
  month_label: string;
  /** ISO day of week, 1 = Monday */
  day_of_week: number;
  /** July–June season, e.g. '2022–23' (en dash) */
  winter_season: string;
}

export interface DimShopTable {
  shop_key: Bigint;
  shop_code: string;
  name: string;
  region: string | null;
  town: string | null;
  lat: number | null;
  lon: number | null;
  climate_zone: string | null;
  time_zone: string | null;
  weather_station: string | null;
  export_profile: string | null;
}

export interface DimComponentTable {
  component_key: Bigint;
  component_code: string;
  name: string;
  system: string;
  assembly: string;
  cold_start_aid: Generated<boolean>;
}

export interface DimFailureModeTable {
  failure_mode_key: Bigint;
  failure_mode_code: string;
  name: string;
}

export interface DimFmiTable {
  fmi: number;
  meaning: string;
}

export interface DimMachineTable {
  machine_key: Bigint;
  serial: string;
  model_code: string;
  model_line: string;
  engine_family: string;
  cold_start_aid: "glow_plugs" | "grid_heater" | "none";
  engine_serial: string | null;
  build_date: string | null;
  delivery_date: string | null;
  delivery_hours: NullableNumeric;
  home_shop_key: NullableBigint;
  heater_plug_lot: string | null;
  block_heater_fitted: Generated<boolean>;
  block_heater_date: string | null;
  warranty_base_months: number | null;
  warranty_base_hours: number | null;
  warranty_engine_months: number | null;
  warranty_engine_hours: number | null;
  row_hash: string;
  batch_id: Bigint;
}

/**
 * A machine's home shops over time (migrations/0054_record_home_shop_moves.ts): each valid on [valid_from, valid_to),
 * the first from '-infinity', the current one with valid_to null (dim_machine.home_shop_key is its shop).
 */
export interface MachineHomeShopTable {
  machine_key: Bigint;
  shop_key: Bigint;
  valid_from: string;
  valid_to: string | null;
  batch_id: Bigint;
}

export interface DimTechnicianTable {
  technician_key: Bigint;
  shop_key: Bigint;
  tech_id: string;
  display_name: string;
}

export interface DimPartTable {
  part_key: Bigint;
  part_number: string;
  supplier_lot: Generated<string>;
  description: string | null;
  supplier: string | null;
}

export interface FactRepairLineTable {
  repair_line_key: Bigint;
  shop_key: Bigint;
  ro_number: string;
  line_no: number;
  machine_key: Bigint;
  component_key: Bigint;
  failure_mode_key: NullableBigint;
  technician_key: NullableBigint;
  part_key: NullableBigint;
  opened_date: string;
  closed_date: string | null;
  hour_meter: NullableNumeric;
  meter_note: string | null;
  complaint: string | null;
  cause: string | null;
  correction: string | null;
  labor_op: string | null;
  standard_hours: NullableNumeric;
  labor_hours: NullableNumeric;
  parts_cost: NullableNumeric;
  labor_cost: NullableNumeric;
  pay_type: "customer" | "warranty" | "internal" | "goodwill";
  /** null when the pay type is unknown */
  is_warranty: Computed<boolean | null>;
  line_type: "failure" | "pm" | "return_for_parts" | "install";
  part_number: string | null;
  part_description: string | null;
  part_qty: NullableNumeric;
  supplier_lot: string | null;
  part_ordered_date: string | null;
  part_received_date: string | null;
  back_ordered: Generated<boolean>;
  /** part_received_date − part_ordered_date, in calendar days */
  parts_wait_days: Computed<number | null>;
  fault_codes_raw: string | null;
  ambient_temp_c: NullableNumeric;
  row_hash: string;
  first_batch_id: Bigint;
  batch_id: Bigint;
  /** the hour-meter checks' verdict on this line's reading (see fact_hour_reading) */
  meter_generation: Generated<number>;
  hour_valid: Generated<boolean>;
  hour_invalid_reason: string | null;
}

export interface FactRepairLineHistoryTable {
  history_id: Generated<string>;
  repair_line_key: Bigint;
  /** the fact row as it was before the correcting batch, as JSON */
  prior_row: unknown;
  prior_batch_id: Bigint;
  replaced_by_batch: Bigint;
  replaced_at: ColumnType<Date, Date | undefined, Date>;
}

export interface FactFaultCodeTable {
  repair_line_key: Bigint;
  spn: number;
  fmi: number;
  occurrences: Generated<number>;
}

export interface FactMeasurementTable {
  measurement_key: Bigint;
  repair_line_key: Bigint;
  machine_key: Bigint;
  shop_key: Bigint;
  measured_date: string;
  kind: MeasurementKindColumn;
  /** cylinder or plug number; 0 when the reading has no position */
  position: Generated<number>;
  attempt: Generated<number>;
  /** canonical unit per kind (psi, ohm, V); null only when over_range */
  value: NullableNumeric;
  unit: string;
  /** the meter showed over-limit ("OL"): open circuit for resistance */
  over_range: Generated<boolean>;
  raw_value: string;
  raw_unit: string | null;
  conversion_rule: string;
  row_hash: string;
  batch_id: Bigint;
}

/**
 * fact_hour_reading is a view (migration 0040): the readings of fact_meter_reading (delivery, hours exports)
 * and one per repair-order line with an hour meter, keyed by the line's key. Write to fact_meter_reading,
 * or to the line's meter_generation / hour_valid / hour_invalid_reason.
 */
export interface FactHourReadingTable {
  hour_reading_key: Bigint;
  machine_key: Bigint;
  reading_date: string;
  hours: Numeric;
  source: HourSource;
  repair_line_key: NullableBigint;
  meter_change: Generated<boolean>;
  meter_note: string | null;
  /** 0 until the first meter replacement, then 1, 2, … */
  meter_generation: Generated<number>;
  valid: Generated<boolean>;
  invalid_reason: string | null;
  row_hash: string;
  batch_id: Bigint;
}

export interface FactWeatherDayTable {
  shop_key: Bigint;
  date: string;
  tmin_c: Numeric;
  tmax_c: NullableNumeric;
  source_unit: "C" | "F";
  row_hash: string;
  batch_id: Bigint;
}

/** Derived: machine-days and engine hours per cohort × shop × month × band (etl/derived/refresh-exposure.ts). */
export interface AggExposureTable {
  engine_family: string;
  model_line: string;
  build_month: string;
  lot: string;
  shop_key: Bigint;
  month: string;
  temp_band: string;
  hour_band: string;
  machines: number;
  machine_days: number;
  engine_hours: number;
}

/** agg_exposure without build month, lot and machine count. */
export type AggExposureFleetTable = Omit<AggExposureTable, "build_month" | "lot" | "machines">;

/** When each derived table was last rebuilt, and from which batch. */
export interface AggRefreshTable {
  name: string;
  refreshed_at: Date;
  last_batch: NullableBigint;
  rows: number;
  seconds: number;
}

/** Derived: one machine's share of agg_exposure (etl/derived/refresh-exposure.ts keeps the aggregate by difference). */
export interface AggExposureMachineTable {
  machine_key: Bigint;
  month: string;
  lot: string;
  temp_band: string;
  hour_band: string;
  /** the machine's home shop on those days (machine_home_shop) */
  shop_key: Bigint;
  machine_days: number;
  engine_hours: number;
}

/** Derived: the cohort a machine's share of agg_exposure was counted under (its shop is per day, in the share's rows). */
export interface AggExposureCohortTable {
  machine_key: Bigint;
  engine_family: string;
  model_line: string;
  build_month: string;
}

/** Derived: each machine's first and last valid engine hours and first reading date (from v_engine_hours). */
export interface AggMachineTrailTable {
  machine_key: Bigint;
  first_h: number;
  last_h: number;
  first_d: string;
}

/** Derived: per shop and day, weather days so far in each temperature band (shared/bands.ts order). */
export interface AggWeatherBandDaysTable {
  shop_key: Bigint;
  date: string;
  days_through: number[];
}

/** Derived: repair lines whose hour-meter verdict was unusual at the last exposure refresh. */
export interface AggExposureNotableReadingTable {
  repair_line_key: Bigint;
  machine_key: Bigint;
  meter_generation: number;
  hour_valid: boolean;
}

/** View: interpolated engine hours per machine and reading date, continuous across meter generations. */
export interface VEngineHoursView {
  machine_key: Bigint;
  reading_date: string;
  engine_hours: number;
}

export interface WarehouseTables {
  agg_exposure: AggExposureTable;
  agg_exposure_fleet: AggExposureFleetTable;
  agg_refresh: AggRefreshTable;
  agg_exposure_machine: AggExposureMachineTable;
  agg_exposure_cohort: AggExposureCohortTable;
  agg_machine_trail: AggMachineTrailTable;
  agg_weather_band_days: AggWeatherBandDaysTable;
  agg_exposure_notable_reading: AggExposureNotableReadingTable;
  v_engine_hours: VEngineHoursView;
  etl_batch: EtlBatchTable;
  etl_upload: EtlUploadTable;
  etl_profile_version: EtlProfileVersionTable;
  hour_verdict_change: HourVerdictChangeTable;
  etl_reject: EtlRejectTable;
  dim_date: DimDateTable;
  dim_shop: DimShopTable;
  dim_component: DimComponentTable;
  dim_failure_mode: DimFailureModeTable;
  dim_fmi: DimFmiTable;
  dim_machine: DimMachineTable;
  machine_home_shop: MachineHomeShopTable;
  dim_technician: DimTechnicianTable;
  dim_part: DimPartTable;
  fact_repair_line: FactRepairLineTable;
  fact_repair_line_history: FactRepairLineHistoryTable;
  fact_fault_code: FactFaultCodeTable;
  fact_measurement: FactMeasurementTable;
  fact_hour_reading: FactHourReadingTable;
  fact_meter_reading: FactHourReadingTable;
  fact_weather_day: FactWeatherDayTable;
  warranty_policy: WarrantyPolicyTable;
  warranty_policy_version: WarrantyPolicyVersionTable;
  warranty_claim: WarrantyClaimTable;
  warranty_claim_line: WarrantyClaimLineTable;
  warranty_claim_audit: WarrantyClaimAuditTable;
  warranty_attachment: WarrantyAttachmentTable;
  warranty_send: WarrantySendTable;
  warranty_claim_note: WarrantyClaimNoteTable;
}

// Warranty claims (migrations/0020_create_warranty.ts).
export type ClaimKindColumn = "repair" | "campaign";
export type ClaimStatusColumn = "draft" | "submitted" | "accepted" | "partly_accepted" | "rejected" | "credited" | "written_off";
export type SendStatusColumn = "sending" | "queued" | "sent" | "failed";

/** A view since migration 0063: each engine family's current policy version (read only). */
export interface WarrantyPolicyTable {
  engine_family: string;
  claim_days: number;
  part_retention_days: number;
  warranty_email: string;
  updated_at: ColumnType<Date, never, never>;
  policy_version_id: ColumnType<string, never, never>;
  version: ColumnType<number, never, never>;
  base_months: ColumnType<number, never, never>;
  base_hours: ColumnType<number, never, never>;
  engine_months: ColumnType<number, never, never>;
  engine_hours: ColumnType<number, never, never>;
}

/** Every saved version of a warranty policy; never updated (migration 0063). */
export interface WarrantyPolicyVersionTable {
  policy_version_id: Generated<string>;
  engine_family: string;
  version: number;
  base_months: number;
  base_hours: number;
  engine_months: number;
  engine_hours: number;
  claim_days: number;
  part_retention_days: number;
  warranty_email: string;
  saved_by: string;
  saved_at: ColumnType<Date, Date | undefined, never>;
  note: string | null;
}

export interface WarrantyClaimTable {
  claim_id: Generated<string>;
  claim_number: string;
  kind: ClaimKindColumn;
  status: Generated<ClaimStatusColumn>;
  title: string;
  shop_code: string | null;
  engine_family: string;
  closed_date: string;
  claim_days: number;
  deadline: string;
  amount_claimed: NullableNumeric;
  amount_credited: NullableNumeric;
  reason: string | null;
  note: string | null;
  cluster_id: string | null;
  cluster_snapshot: unknown;
  /** the unit the packet states temperatures in: the creating clerk's (migration 0058) */
  temperature_unit: Generated<"C" | "F">;
  /** the narrative the maker reads (migration 0062) */
  narrative_found: Generated<string | null>;
  narrative_done: Generated<string | null>;
  narrative_why: Generated<string | null>;
  created_by: string;
  created_by_name: string;
  created_at: ColumnType<Date, Date | undefined, never>;
  updated_at: ColumnType<Date, Date | undefined, Date>;
  submitted_at: Date | null;
  decided_at: Date | null;
  credited_at: Date | null;
  /** the warranty policy version the claim was judged under; set by a trigger when not given (migration 0063) */
  policy_version_id: Generated<string>;
  /** versions, the way the claim went out and the maker's payment (migration 0059) */
  revision: Generated<number>;
  previous_claim_id: Bigint | null;
  correction: string | null;
  resubmit_from: string | null;
  amount_paid: NullableNumeric;
  filed_via: "mail" | "other" | "unrecorded" | null;
  filed_reference: string | null;
  filed_on: string | null;
  days_late: number | null;
  written_off_reason: string | null;
}

export interface WarrantyClaimLineTable {
  claim_id: Bigint;
  repair_line_key: Bigint;
  shop_code: string;
  /** a line not covered that the clerk included deliberately, with why (migration 0059) */
  include_reason: string | null;
  included_by: string | null;
  included_at: Date | null;
}

export interface WarrantyClaimAuditTable {
  audit_id: Generated<string>;
  claim_id: Bigint;
  at: ColumnType<Date, Date | undefined, never>;
  actor_sub: string;
  actor_name: string;
  action: string;
  changes: unknown;
}

/** Notes between the warranty clerk and the shop on a claim (migration 0062); never in the packet. */
export interface WarrantyClaimNoteTable {
  note_id: Generated<string>;
  claim_id: string;
  author_sub: string;
  author_name: string;
  author_role: string;
  body: string;
  at: ColumnType<Date, Date | undefined, never>;
}

export interface WarrantyAttachmentTable {
  attachment_id: Generated<string>;
  claim_id: Bigint;
  s3_key: string;
  content_type: string;
  extension: string;
  size_bytes: number;
  original_name: string;
  uploaded_by: string;
  uploaded_at: ColumnType<Date, Date | undefined, never>;
}

export interface WarrantySendTable {
  send_id: Generated<string>;
  claim_id: Bigint;
  to_address: string;
  status: SendStatusColumn;
  attempts: Generated<number>;
  last_error: string | null;
  message_id: string | null;
  requested_by: string;
  requested_at: ColumnType<Date, Date | undefined, never>;
  updated_at: ColumnType<Date, Date | undefined, Date>;
  sent_at: Date | null;
}
