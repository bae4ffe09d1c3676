import type { BenchCreateLine, BenchRefusal, BenchSheet } from "../../../shared/schemas/bench-sheet.js";

/**
 * A bench sheet as rows of the generic export layouts (etl/layouts.ts), each row remembering the sheet field it
 * came from, so a row the loader refuses (by its line number in the file) is named back as the field the
 * technician typed into. Pure: the files are written and loaded by save-sheet.ts.
 */

export interface SheetRow<R> {
  row: R;
  /** the sheet's field, as a path: "plugs.0.resistance", "compression.cylinders.2.attempts.1" */
  field: string;
  /** the field in words */
  label: string;
  /** what went to the loader, with its unit, as the refusal repeats it */
  shown: string;
}

export interface MeasurementRow {
  shop_code: string;
  ro_number: string;
  line_no: string;
  kind: string;
  position: string;
  attempt: string;
  value: string;
  unit: string;
}

export interface HoursRow {
  serial: string;
  reading_date: string;
  hours: string;
  source: string;
}

export interface JobRow {
  shop_code: string;
  ro_number: string;
  line_no: string;
  serial: string;
  opened_date: string;
  complaint: string;
  component_code: string;
}

export interface LineKey {
  shopCode: string;
  roNumber: string;
  lineNo: number;
}

/** Numbers as typed (no grouping, no exponent for ordinary sizes). */
const num = (n: number) => (Number.isFinite(n) ? String(n) : "not a number");

const RESISTANCE_UNIT_WORDS = { ohm: "Ω", kohm: "kΩ" } as const;
const BENCH_WORDS = { heats: "heats", no_heat: "no heat" } as const;

/** The measurement rows of a sheet, in the order the file is written (line 2 is the first row). */
export function measurementRows(line: LineKey, sheet: BenchSheet): SheetRow<MeasurementRow>[] {
  const out: SheetRow<MeasurementRow>[] = [];
  const add = (kind: string, position: number, attempt: number, value: string, unit: string, field: string, label: string, shown: string) =>
    out.push({
      row: { shop_code: line.shopCode, ro_number: line.roNumber, line_no: String(line.lineNo), kind, position: String(position), attempt: String(attempt), value, unit },
      field,
      label,
      shown,
    });
  const c = sheet.conditions;
  if (c.ambient) add("ambient_temperature", 0, 1, num(c.ambient.value), c.ambient.unit, "conditions.ambient", "Ambient temperature", `${num(c.ambient.value)} °${c.ambient.unit}`);
  if (c.engine) add("engine_state", 0, 1, c.engine, "", "conditions.engine", "Engine cold or warm", c.engine);
  if (sheet.railVoltage !== null) add("rail_voltage", 0, 1, num(sheet.railVoltage), "V", "railVoltage", "Rail voltage, key on", `${num(sheet.railVoltage)} V`);
  if (sheet.preheatLamp !== null) {
    const words = sheet.preheatLamp ? "lit" : "not lit";
    add("preheat_lamp", 0, 1, words, "", "preheatLamp", "Wait-to-start lamp", words);
  }
  sheet.plugs.forEach((p, i) => {
    const r = p.resistance;
    if (r) {
      if (r.unit === "OL") add("plug_resistance", p.position, 1, "OL", "", `plugs.${i}.resistance`, `Plug ${p.position} resistance`, "OL");
      else add("plug_resistance", p.position, 1, num(r.value), r.unit, `plugs.${i}.resistance`, `Plug ${p.position} resistance`, `${num(r.value)} ${RESISTANCE_UNIT_WORDS[r.unit]}`);
    }
    if (p.bench !== "not_tested") {
      const words = BENCH_WORDS[p.bench];
      add("bench_test", p.position, 1, words, "", `plugs.${i}.bench`, `Plug ${p.position} bench test`, words);
    }
  });
  const unit = sheet.compression.unit;
  sheet.compression.cylinders.forEach((cyl, i) =>
    cyl.attempts.forEach((a, j) =>
      add("compression", cyl.position, j + 1, num(a), unit, `compression.cylinders.${i}.attempts.${j}`, `Cylinder ${cyl.position} compression, attempt ${j + 1}`, `${num(a)} ${unit}`),
    ),
  );
  return out;
}

/** The sheet's hour-meter reading as a row of the generic hours layout, or none. */
export function hoursRows(serial: string, sheet: BenchSheet): SheetRow<HoursRow>[] {
  const h = sheet.conditions.hourMeter;
  if (h === null) return [];
  return [{
    row: { serial, reading_date: sheet.readingDate, hours: num(h), source: "sheet" },
    field: "conditions.hourMeter",
    label: "Hour meter",
    shown: `${num(h)} h on ${sheet.readingDate}`,
  }];
}

/** A line the shop's system has not exported yet, as a row of the generic jobs layout. */
export function jobRows(line: BenchCreateLine & { componentCode: string }): SheetRow<JobRow>[] {
  return [{
    row: {
      shop_code: line.shopCode, ro_number: line.roNumber, line_no: String(line.lineNo), serial: line.serial, opened_date: line.openedDate,
      // one line of text: a line break would make the file's line numbers disagree with its rows
      complaint: line.complaint.replace(/\s*[\r\n]+\s*/g, " "),
      component_code: line.componentCode,
    },
    field: "line",
    label: `Repair order ${line.roNumber} line ${line.lineNo}`,
    shown: `${line.shopCode} ${line.roNumber}/${line.lineNo}`,
  }];
}

/** The field a refusal of a created line's row is about, by the loader's code. */
const JOB_FIELDS: Record<string, { field: string; label: string }> = {
  future_date: { field: "openedDate", label: "Opened date" },
  bad_date: { field: "openedDate", label: "Opened date" },
  unknown_machine: { field: "serial", label: "Serial" },
  unknown_code: { field: "componentCode", label: "Component" },
};

/** The field a refusal of the hour-meter row is about: its date, or the reading. */
const HOUR_FIELDS: Record<string, { field: string; label: string }> = {
  future_date: { field: "readingDate", label: "Reading date" },
  bad_date: { field: "readingDate", label: "Reading date" },
  unknown_machine: { field: "conditions.hourMeter", label: "Hour meter (the machine)" },
};

export interface LoaderReject {
  /** the line of the file, the header being line 1 */
  line: number;
  code: string;
  reason: string;
}

/**
 * The loader's refusals named as the sheet's fields. Rows are written one a line after the header, so the
 * row at index i is line i + 2. A refusal on a line the rows do not have (which would be a fault of the file
 * writer) is kept, named as the whole sheet.
 */
export function refusalsOf<R>(rows: readonly SheetRow<R>[], rejects: readonly LoaderReject[], by: "measurements" | "hours" | "jobs"): BenchRefusal[] {
  return rejects.map((r) => {
    const row = rows[r.line - 2];
    if (!row) return { field: "sheet", label: "The sheet", value: "", reason: r.reason };
    const named = by === "jobs" ? JOB_FIELDS[r.code] : by === "hours" ? HOUR_FIELDS[r.code] : undefined;
    return { field: named?.field ?? row.field, label: named?.label ?? row.label, value: row.shown, reason: r.reason };
  });
}
