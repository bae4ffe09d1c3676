import { components, failureModes, lineTypes, payTypes } from "../../shared/catalog.js";
import { checkRange, FieldReader, mapCode } from "./fields.js";
import { reject } from "./reject.js";
import { fahrenheitToCelsius } from "./units.js";
import { normaliseCode, normaliseIdentifier } from "./values.js";

/** No repair order has more lines than this (common practice, no source); the column holds far more. */
export const MAX_LINE_NO = 9_999;

const componentCodes = new Set(components.map((c) => c.code));
const failureModeByKey = new Map<string, string>(failureModes.flatMap((f) => [[f.code, f.code], [f.name.toUpperCase(), f.code]]));
const payTypeSet = new Set<string>(payTypes);
const lineTypeSet = new Set<string>(lineTypes);

export interface JobStage {
  shop_code: string;
  ro_number: string;
  line_no: number;
  serial: string;
  opened_date: string;
  closed_date: string | null;
  hour_meter: number | null;
  meter_change: boolean;
  meter_note: string | null;
  complaint: string | null;
  cause: string | null;
  correction: string | null;
  component_code: string;
  failure_mode: string | null;
  labor_op: string | null;
  standard_hours: number | null;
  labor_hours: number | null;
  parts_cost: number | null;
  labor_cost: number | null;
  pay_type: string;
  line_type: string;
  tech_id: string | null;
  part_number: string | null;
  part_description: string | null;
  part_qty: number | null;
  supplier_lot: string | null;
  part_ordered_date: string | null;
  part_received_date: string | null;
  back_ordered: boolean;
  /** normalised "spn:fmi:count" items joined by ';' */
  fault_codes: string | null;
  ambient_temp_c: number | null;
}

/** "520210-5", "SPN 520210 FMI 5", "520210/5 x2" → [spn, fmi, count]; items separated by ';', ',', '|' or spaces between pairs. */
export function parseFaultCodes(text: string): [number, number, number][] | null {
  const out: [number, number, number][] = [];
  const re = /(?:SPN\s*)?(\d{1,6})\s*[-:/]?\s*(?:FMI\s*)?[-:/]?\s*(\d{1,2})(?:\s*[x×]\s*(\d+))?/giy;
  let rest = text.trim();
  while (rest.length > 0) {
    re.lastIndex = 0;
    const m = re.exec(rest);
    if (!m || m[0].length === 0) return null;
    const [spn, fmi, count] = [Number(m[1]), Number(m[2]), m[3] ? Number(m[3]) : 1];
    // SAE J1939-73 (from memory): an SPN has 19 bits, an FMI 5, an occurrence count 7 (126 at most; 127 = not available)
    if (spn > 524287 || fmi > 31 || count > 126) return null;
    out.push([spn, fmi, count]);
    rest = rest.slice(m[0].length).replace(/^[\s;,|]+/, "");
  }
  return out;
}

/** One repair-order line: parse, convert to canonical units and codes, check what a single row can show. */
export function transformJob(f: FieldReader, shop: string | undefined): JobStage {
  const p = f.profile;
  const shopCode = normaliseCode(f.text("shop_code") ?? shop ?? "");
  const opened = f.date("opened_date", "opened date")!;
  const closed = f.date("closed_date", "closed date");
  if (closed !== null && closed < opened) reject("closed_before_opened", `closed ${closed} before it was opened ${opened}`);
  const hourMeter = f.hours("hour_meter", "hour meter");
  checkRange(hourMeter, "hour meter", "h", 100_000);

  const rawComponent = f.text("component_code")!;
  const component = mapCode(p.codes.component, rawComponent);
  if (!componentCodes.has(component)) reject("unknown_code", `component code "${rawComponent}" is not in this shop's code table or Ironledger's component list`);

  const rawMode = f.text("failure_mode");
  const failureMode = rawMode === null ? null : (failureModeByKey.get(rawMode.toUpperCase()) ?? null);
  if (rawMode !== null && failureMode === null) reject("unknown_code", `failure mode "${rawMode}" is not one Ironledger knows (${failureModes.map((m) => m.code).join(", ")})`);

  const standardHours = f.hours("standard_hours", "standard hours");
  checkRange(standardHours, "standard hours", "h", 200);
  const laborHours = f.hours("labor_hours", "labour hours");
  checkRange(laborHours, "labour hours", "h", 500);
  const partsCost = f.number("parts_cost", "parts cost");
  checkRange(partsCost, "parts cost", "", 1_000_000);
  const laborCost = f.number("labor_cost", "labour cost");
  checkRange(laborCost, "labour cost", "", 1_000_000);

  const rawPay = f.text("pay_type");
  const payType = rawPay === null ? "customer" : mapCode(p.codes.payType, rawPay).toLowerCase();
  if (!payTypeSet.has(payType)) reject("unknown_code", `pay type "${rawPay}" is not one of ${payTypes.join(", ")}`);
  const rawLine = f.text("line_type");
  const lineType = rawLine === null ? (component === "SVC-PM" ? "pm" : "failure") : rawLine.toLowerCase().replace(/[\s-]+/g, "_");
  if (!lineTypeSet.has(lineType)) reject("unknown_code", `line type "${rawLine}" is not one of ${lineTypes.join(", ")}`);

  const partQty = f.number("part_qty", "part quantity");
  checkRange(partQty, "part quantity", "", 10_000);
  const ordered = f.date("part_ordered_date", "part ordered date");
  const received = f.date("part_received_date", "part received date");
  if (ordered !== null && received !== null && received < ordered) reject("received_before_ordered", `part received ${received} before it was ordered ${ordered}`);

  const rawFault = f.text("fault_codes");
  const faults = rawFault === null ? null : parseFaultCodes(rawFault);
  if (rawFault !== null && faults === null) reject("unknown_code", `fault codes "${rawFault}" are not SPN-FMI pairs such as 520210-5`);

  const ambient = f.number("ambient_temp", "ambient temperature");
  const ambientC = ambient === null ? null : p.units.temperature === "F" ? fahrenheitToCelsius(ambient) : ambient;
  if (ambientC !== null && (ambientC < -60 || ambientC > 60)) reject("absurd_value", `ambient temperature ${ambient} °${p.units.temperature} is beyond any plausible weather`);

  const meterNote = f.text("meter_note");
  const partNumber = f.text("part_number");
  const techId = f.text("tech_id");
  const lot = f.text("supplier_lot");
  const stage: JobStage = {
    shop_code: shopCode,
    ro_number: normaliseCode(f.text("ro_number")!),
    line_no: f.integer("line_no", "line number", 1, MAX_LINE_NO)!,
    serial: normaliseIdentifier(f.text("serial")!),
    opened_date: opened,
    closed_date: closed,
    hour_meter: hourMeter === null ? null : Math.round(hourMeter * 10) / 10,
    meter_change: meterNote !== null,
    meter_note: meterNote,
    complaint: f.text("complaint"),
    cause: f.text("cause"),
    correction: f.text("correction"),
    component_code: component,
    failure_mode: failureMode,
    labor_op: f.text("labor_op"),
    standard_hours: standardHours,
    labor_hours: laborHours,
    parts_cost: partsCost,
    labor_cost: laborCost,
    pay_type: payType,
    line_type: lineType,
    tech_id: techId === null ? null : normaliseCode(techId),
    part_number: partNumber === null ? null : normaliseIdentifier(partNumber),
    part_description: f.text("part_description"),
    part_qty: partQty,
    supplier_lot: lot === null ? null : normaliseCode(lot),
    part_ordered_date: ordered,
    part_received_date: received,
    back_ordered: f.flag("back_ordered", "back-ordered") ?? false,
    fault_codes: faults === null || faults.length === 0 ? null : faults.map((x) => x.join(":")).join(";"),
    ambient_temp_c: ambientC === null ? null : Math.round(ambientC * 10) / 10,
  };
  return stage;
}
