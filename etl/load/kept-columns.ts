import { layouts } from "../layouts.js";
import type { ExportKind } from "../profiles/profile-schema.js";

/**
 * A file without one of its kind's optional columns says nothing about that column: a correction must not
 * blank what the warehouse already holds. These are the warehouse columns each canonical column fills, where
 * the names differ; the merges leave the columns of absent canonical columns as they are on lines they update.
 */
const FILLS: Partial<Record<ExportKind, Record<string, string[]>>> = {
  // the date of a move of home shop fills no column of dim_machine (machine_home_shop; etl/load/merge-others.ts)
  machines: { home_shop_since: [] },
  jobs: {
    ambient_temp: ["ambient_temp_c"],
    fault_codes: ["fault_codes_raw"],
    failure_mode: ["failure_mode_key"],
    tech_id: ["technician_key"],
    part_number: ["part_number", "part_key"],
  },
  weather: { tmax: ["tmax_c"] },
  hours: { meter_note: ["meter_note", "meter_change"] },
};

/** Columns of a kind that identify a row (part of its key) or that a profile cannot leave out: never kept. */
const NEVER_KEPT: Record<ExportKind, readonly string[]> = {
  machines: ["serial", "model_code", "home_shop"],
  jobs: ["shop_code", "ro_number", "line_no", "serial", "opened_date", "component_code"],
  // position, attempt and unit decide what a reading is; a file without them means position 0, attempt 1, the profile's unit
  measurements: ["shop_code", "ro_number", "line_no", "kind", "position", "attempt", "value", "unit"],
  weather: ["shop_code", "date", "tmin"],
  hours: ["serial", "reading_date", "hours", "source"],
};

/**
 * The warehouse columns a load keeps as they are on the rows it updates, because the file's header lacks the
 * canonical column that fills them. `mapped` holds the canonical columns the header has.
 */
export function keptColumns(kind: ExportKind, mapped: ReadonlySet<string>): string[] {
  const out: string[] = [];
  for (const c of layouts[kind]) {
    if (mapped.has(c) || NEVER_KEPT[kind].includes(c)) continue;
    out.push(...(FILLS[kind]?.[c] ?? [c]));
  }
  return out;
}
