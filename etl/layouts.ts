import type { ExportKind } from "./profiles/profile-schema.js";

/**
 * Ironledger's generic CSV layout per export kind: canonical column names, in order.
 * Units of the generic layout: dates ISO (YYYY-MM-DD), hours decimal engine hours,
 * temperature °C, compression psi, resistance Ω, voltage V, money in the group currency.
 * docs/exports.md documents every column.
 */
export const layouts = {
  machines: [
    "serial", "model_code", "engine_serial", "build_date", "delivery_date", "delivery_hours", "home_shop",
    "heater_plug_lot", "block_heater_fitted", "block_heater_date",
    "warranty_base_months", "warranty_base_hours", "warranty_engine_months", "warranty_engine_hours", "home_shop_since",
  ],
  jobs: [
    "shop_code", "ro_number", "line_no", "serial", "opened_date", "closed_date", "hour_meter", "meter_note",
    "complaint", "cause", "correction", "component_code", "failure_mode", "labor_op", "standard_hours", "labor_hours",
    "parts_cost", "labor_cost", "pay_type", "line_type", "tech_id", "part_number", "part_description", "part_qty",
    "supplier_lot", "part_ordered_date", "part_received_date", "back_ordered", "fault_codes", "ambient_temp",
  ],
  measurements: ["shop_code", "ro_number", "line_no", "kind", "position", "attempt", "value", "unit"],
  weather: ["shop_code", "date", "tmin", "tmax"],
  hours: ["serial", "reading_date", "hours", "source", "meter_note"],
} as const satisfies Record<ExportKind, readonly string[]>;

export type CanonicalColumn<K extends ExportKind> = (typeof layouts)[K][number];
/** A row after header mapping, before validation: canonical column → raw string. */
export type CanonicalRow<K extends ExportKind> = Partial<Record<CanonicalColumn<K>, string>>;
