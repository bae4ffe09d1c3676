import { checkRange, FieldReader } from "./fields.js";
import { reject } from "./reject.js";
import { normaliseIdentifier } from "./values.js";

/** "sheet": a reading a technician entered on the bench sheet (written by the server in this layout) */
export const hourFileSources = ["delivery", "pm", "telematics", "registry", "sheet"] as const;

export interface HourStage {
  serial: string;
  reading_date: string;
  hours: number;
  source: string;
  meter_change: boolean;
  meter_note: string | null;
}

/** One hour-meter reading from a registry or telematics export (repair-order readings come from the jobs export). */
export function transformHours(f: FieldReader): HourStage {
  const hours = f.hours("hours", "hour meter")!;
  checkRange(hours, "hour meter", "h", 100_000);
  const source = (f.text("source") ?? "registry").toLowerCase();
  if (!(hourFileSources as readonly string[]).includes(source)) {
    reject("unknown_code", `reading source "${f.text("source")}" is not one of ${hourFileSources.join(", ")} (repair-order readings come from the jobs export)`);
  }
  const note = f.text("meter_note");
  const stage: HourStage = {
    serial: normaliseIdentifier(f.text("serial")!),
    reading_date: f.date("reading_date", "reading date")!,
    hours: Math.round(hours * 10) / 10,
    source,
    meter_change: note !== null,
    meter_note: note,
  };
  return stage;
}
