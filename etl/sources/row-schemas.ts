import { z } from "zod";
import type { ExportKind } from "../profiles/profile-schema.js";

/**
 * Per export kind, the canonical columns a row cannot do without. The zod schemas check presence
 * (non-blank after trimming); the transforms in etl/transform parse and convert the values.
 */
export const requiredColumns: Record<ExportKind, readonly string[]> = {
  machines: ["serial", "model_code", "home_shop"],
  jobs: ["shop_code", "ro_number", "line_no", "serial", "opened_date", "component_code"],
  measurements: ["shop_code", "ro_number", "line_no", "kind", "value"],
  weather: ["shop_code", "date", "tmin"],
  hours: ["serial", "reading_date", "hours"],
};

const present = z.string().trim().min(1);

function presenceSchema(kind: ExportKind) {
  return z.object(Object.fromEntries(requiredColumns[kind].map((c) => [c, present])));
}

export const rowSchemas: Record<ExportKind, ReturnType<typeof presenceSchema>> = {
  machines: presenceSchema("machines"),
  jobs: presenceSchema("jobs"),
  measurements: presenceSchema("measurements"),
  weather: presenceSchema("weather"),
  hours: presenceSchema("hours"),
};

/** Column names as a person reads them in a reason: "ro_number" → "ro number". */
export function columnLabel(c: string): string {
  return c.replace(/_/g, " ");
}

/** The required columns a row leaves blank, from zod's issues (empty when the row has them all). */
export function missingFields(kind: ExportKind, row: Record<string, string | undefined>): string[] {
  // only the required columns go to zod: validating the other thirty-odd optional strings costs time per row
  const required: Record<string, string | undefined> = {};
  for (const c of requiredColumns[kind]) required[c] = row[c];
  const r = rowSchemas[kind].safeParse(required);
  return r.success ? [] : [...new Set(r.error.issues.map((i) => String(i.path[0])))];
}
