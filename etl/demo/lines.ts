/**
 * Simulated events → canonical records (etl/layouts.ts columns, canonical units): one job line per event and
 * its measurements. Free text, labour, prices and readings are drawn from the line's own seed, so a line
 * renders the same whatever else changes.
 */
import { isoOf } from "./calendar.js";
import type { Machine } from "./fleet.js";
import type { CanonicalRecord, RowDrift } from "./profile-writer.js";
import { hashLabel, Rng, stream } from "./prng.js";
import { quirks, spn } from "./scenario.js";
import { componentDetail, pmDetail } from "./shop-floor.js";
import type { JobEvent } from "./simulate.js";
import { fToC } from "./weather.js";

export interface LineContext {
  shopCode: string;
  roNumber: string;
  lineNo: number;
  machine: Machine | null;
  family: Machine["family"];
  cylinders: number;
  labourRate: number;
  techEfficiency: number;
  /** days added to the event's (generator-calendar) days when written: the anchor's move (anchor.ts) */
  shiftDays: number;
  /** the history's last day (generator calendar): the export is taken then, so later days are not yet known */
  lastDay: number;
}

const round = (x: number, d: number): number => Math.round(x * 10 ** d) / 10 ** d;

/** A technician's pace against standard time: lognormal around 1 (SD of the log 0.12), fixed per technician. */
export function techEfficiency(seed: number, tech: string): number {
  return stream(seed, "tech", hashLabel(tech)).lognormal(1, 0.12);
}

/**
 * One event as the shop's system exports it on the history's last day: a line still running then (waiting
 * for a back-ordered part, or work not finished) is open, with a blank close date, and a part not yet
 * arrived has a blank received date.
 */
export function jobRecord(e: JobEvent, ctx: LineContext): CanonicalRecord {
  const rng = new Rng(e.seed);
  const date = (day: number): string => isoOf(day + ctx.shiftDays);
  const known = (day: number | null): string | null => (day === null || day > ctx.lastDay ? null : date(day));
  const base = {
    shop_code: ctx.shopCode, ro_number: ctx.roNumber, line_no: ctx.lineNo, serial: e.serial,
    opened_date: date(e.openDay), closed_date: known(e.closeDay), hour_meter: round(e.meter, 1), meter_note: e.meterNote,
    component_code: e.component, line_type: e.lineType, tech_id: e.tech, pay_type: e.payType,
    ambient_temp: e.ambientF === null ? null : fToC(e.ambientF),
  };
  if (e.lineType === "pm") {
    const op = pmDetail.ops[e.pmOp]!;
    const actual = op.standardHours * ctx.techEfficiency * rng.lognormal(1, 0.15);
    return {
      ...base, complaint: `Scheduled ${op.op.slice(3)} h service`, cause: "Planned maintenance", correction: `Performed ${op.op} service`,
      failure_mode: "", labor_op: op.op, standard_hours: op.standardHours, labor_hours: round(actual, 2),
      parts_cost: round(op.cost * rng.uniform(0.92, 1.12), 2), labor_cost: round(actual * ctx.labourRate, 2),
      part_number: op.kit, part_description: op.description, part_qty: 1, supplier_lot: "", part_ordered_date: null, part_received_date: null,
      back_ordered: false, fault_codes: "",
    };
  }
  const detail = componentDetail[e.component]!;
  const standard = detail.standardHours[ctx.family];
  let actual = standard * ctx.techEfficiency * rng.lognormal(1, 0.22);
  let cause = rng.pick(detail.causes[e.mode] ?? detail.causes[Object.keys(detail.causes)[0]!]!);
  let correction = rng.pick(detail.corrections);
  if (e.lineType === "install" && e.socketCorroded) {
    cause = "socket corroded";
    correction = "Replaced corroded socket, installed engine block heater";
    actual += 1.0;
  }
  if (e.comeback) cause = "same fault";
  const qty = detail.partQty(ctx.cylinders);
  const complaint = rng.pick(detail.complaints);
  return {
    ...base,
    complaint: e.comeback ? `Back again: ${complaint.toLowerCase()}` : complaint, cause, correction,
    failure_mode: e.mode, labor_op: detail.laborOp, standard_hours: standard, labor_hours: round(actual, 2),
    parts_cost: round(detail.unitCost * qty * rng.uniform(0.9, 1.15), 2), labor_cost: round(actual * ctx.labourRate, 2),
    part_number: detail.partNumber(ctx.family), part_description: detail.partDescription, part_qty: qty, supplier_lot: e.lot,
    part_ordered_date: e.orderDay === null ? null : date(e.orderDay), part_received_date: known(e.receivedDay),
    back_ordered: e.backOrdered, fault_codes: faultCodes(rng, e),
  };
}

function faultCodes(rng: Rng, e: JobEvent): string {
  const logged = (code: number, p: number): string => (rng.chance(p) ? `SPN ${code} FMI 5` : "");
  if (e.component === "ENG-CSA-HPLUG") return logged(spn.plugOpen, 0.85);
  if (e.component === "ENG-CSA-RELAY") return logged(spn.relayOpen, 0.9);
  if (e.component === "ENG-CSA-GRID") return logged(spn.gridOpen, 0.85);
  return "";
}

export interface MeasurementRow {
  record: CanonicalRecord;
  drift?: RowDrift;
}

/** Measurements taken on a line (SCENARIO.md "On heater-plug lines"), canonical units: psi, Ω, V. */
export function measurementRows(seed: number, e: JobEvent, ctx: LineContext): MeasurementRow[] {
  if (e.lineType !== "failure" || !ctx.machine) return [];
  const rng = new Rng(e.seed ^ 0x5bd1e995);
  const m = ctx.machine;
  const rows: MeasurementRow[] = [];
  const drift: RowDrift | undefined = e.tech === quirks.driftTech ? { compressionUnit: "kPa" } : undefined;
  const add = (kind: string, position: number, attempt: number, value: number | string, unit: string): void => {
    rows.push({
      record: { shop_code: ctx.shopCode, ro_number: ctx.roNumber, line_no: ctx.lineNo, kind, position, attempt, value, unit },
      drift: kind === "compression" ? drift : undefined,
    });
  };
  const compression = (cylinderValue: (cyl: number) => number, clip?: [number, number]): void => {
    for (let cyl = 1; cyl <= m.cylinders; cyl++) {
      const mean = cylinderValue(cyl);
      for (let attempt = 1; attempt <= 3; attempt++) {
        let v = mean + rng.normal(0, 8);
        if (clip) v = Math.min(clip[1], Math.max(clip[0], v));
        add("compression", cyl, attempt, round(v, 1), "psi");
      }
    }
  };
  const healthyCompression = (): void => {
    const engine = stream(seed, "engine", m.index);
    const offsets = Array.from({ length: m.cylinders }, () => engine.normal(0, 10));
    const mean = m.compressionNew - (6 * e.trueHours) / 1000;
    compression((cyl) => mean + offsets[cyl - 1]!);
  };

  switch (e.component) {
    case "ENG-CSA-HPLUG": {
      if (rng.chance(0.8)) {
        const failed = 1 + rng.weightedIndex([0.65, 0.25, 0.1]);
        const bad = new Set(rng.shuffle(Array.from({ length: m.cylinders }, (_, i) => i + 1)).slice(0, Math.min(failed, m.cylinders)));
        for (let pos = 1; pos <= m.cylinders; pos++) {
          if (!bad.has(pos)) add("plug_resistance", pos, 1, round(Math.max(0.3, rng.normal(1.0, 0.1)), 2), "ohm");
          else if (rng.chance(0.4)) add("plug_resistance", pos, 1, "OL", "");
          else add("plug_resistance", pos, 1, Math.round(rng.logUniform(15_000, 90_000)), "ohm");
        }
      }
      if (rng.chance(0.3)) healthyCompression();
      if (m.family === "K26-4R" && rng.chance(0.5)) add("rail_voltage", 0, 1, round(rng.normal(12.2, 0.2), 2), "V");
      break;
    }
    case "ENG-CSA-RELAY":
      if (rng.chance(0.85)) add("rail_voltage", 0, 1, round(rng.uniform(0, 0.3), 2), "V");
      break;
    case "ENG-BLK-RING":
      if (rng.chance(0.9)) {
        const means = Array.from({ length: m.cylinders }, () => rng.uniform(265, 290));
        compression((cyl) => means[cyl - 1]!, [260, 295]);
      }
      break;
    case "ELE-PWR-BATT":
      if (rng.chance(0.8)) add("battery_voltage", 0, 1, round(rng.uniform(10.5, 11.9), 2), "V");
      break;
    case "ELE-STR-MOTOR":
      if (rng.chance(0.5)) add("battery_voltage", 0, 1, round(rng.normal(12.5, 0.15), 2), "V");
      break;
  }
  return rows;
}
