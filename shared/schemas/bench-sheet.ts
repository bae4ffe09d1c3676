import { z } from "zod";
import { engineSpecSchema } from "./engine-specs.js";

/**
 * The bench sheet: readings a technician takes at the machine, saved straight into the warehouse through the
 * same loader the shop exports go through. Numbers are taken as typed; whether a value is possible (a negative
 * resistance, 9,000 psi, a date still to come) is the loader's judgement, and a refusal comes back in words
 * naming the field (benchSheetRefusalSchema).
 */

/** A line counts as open when it has no close date or was closed within this many days. */
export const BENCH_OPEN_DAYS = 14;

export const benchPressureUnits = ["psi", "kPa", "bar"] as const;
export type BenchPressureUnit = (typeof benchPressureUnits)[number];
export const benchTemperatureUnits = ["C", "F"] as const;
export type BenchTemperatureUnit = (typeof benchTemperatureUnits)[number];
export const benchResistanceUnits = ["ohm", "kohm"] as const;
export const benchTestResults = ["heats", "no_heat", "not_tested"] as const;
export type BenchTestResult = (typeof benchTestResults)[number];
export const engineStates = ["cold", "warm"] as const;
export type EngineState = (typeof engineStates)[number];

const isoDate = z.iso.date();

/** GET /api/bench-sheet/lines?q=…: an RO number or a serial (any case, dashes and spaces ignored). */
export const benchSearchQuerySchema = z.object({
  q: z.string().trim().min(2, "Search needs at least 2 characters (an RO number or a serial)").max(40),
});
export type BenchSearchQuery = z.infer<typeof benchSearchQuerySchema>;

/** One repair-order line as the sheet lists it. `id` is "<shop>|<ro>|<line>" (use apiPaths.benchSheetLine). */
export const benchLineSchema = z.object({
  id: z.string(),
  shopCode: z.string(),
  roNumber: z.string(),
  lineNo: z.number().int(),
  serial: z.string(),
  modelLine: z.string().nullable(),
  engineFamily: z.string().nullable(),
  /** cylinders of the engine family (plugs and compression rows to offer), null when unknown */
  cylinders: z.number().int().nullable(),
  openedDate: z.string(),
  closedDate: z.string().nullable(),
  complaint: z.string().nullable(),
  /** the line was first written by a bench sheet (the shop's export has not carried it, or carried it later) */
  createdOnSheet: z.boolean(),
  /** readings already entered on a bench sheet for this line */
  sheetReadings: z.number().int(),
});
export type BenchLine = z.infer<typeof benchLineSchema>;

export const benchSearchResponseSchema = z.object({
  lines: z.array(benchLineSchema),
  /** the open window used: no close date, or closed within this many days */
  openDays: z.number().int(),
});
export type BenchSearchResponse = z.infer<typeof benchSearchResponseSchema>;

/** POST /api/bench-sheet/lines: a line the shop's system has not exported yet. */
export const benchCreateLineSchema = z.object({
  shopCode: z.string().trim().min(1).max(10),
  roNumber: z.string().trim().min(1).max(30),
  lineNo: z.number().int().min(1).max(999),
  serial: z.string().trim().min(1).max(40),
  openedDate: isoDate,
  complaint: z.string().trim().min(1).max(500),
});
export type BenchCreateLine = z.infer<typeof benchCreateLineSchema>;

/** A plug's resistance as the meter showed it: a number in Ω or kΩ, or "OL" (over limit: open circuit). */
export const benchResistanceSchema = z.discriminatedUnion("unit", [
  z.object({ unit: z.enum(benchResistanceUnits), value: z.number() }),
  z.object({ unit: z.literal("OL") }),
]);
export type BenchResistance = z.infer<typeof benchResistanceSchema>;

export const benchPlugSchema = z.object({
  position: z.number().int().min(1).max(12),
  resistance: benchResistanceSchema.nullable(),
  bench: z.enum(benchTestResults),
});
export type BenchPlug = z.infer<typeof benchPlugSchema>;

export const benchCylinderSchema = z.object({
  position: z.number().int().min(1).max(12),
  /** gauge readings, first attempt first; an empty list means the cylinder was not tested */
  attempts: z.array(z.number()).max(9),
});
export type BenchCylinder = z.infer<typeof benchCylinderSchema>;

/** PUT /api/bench-sheet/lines/:id/sheet: the whole sheet; every field may be left out (null or empty). */
export const benchSheetSchema = z.object({
  /** the day the readings were taken (the hour meter's reading date) */
  readingDate: isoDate,
  conditions: z.object({
    ambient: z.object({ value: z.number(), unit: z.enum(benchTemperatureUnits) }).nullable(),
    engine: z.enum(engineStates).nullable(),
    hourMeter: z.number().nullable(),
  }),
  /** preheat rail or feed voltage, key on, plugs energised, in V */
  railVoltage: z.number().nullable(),
  /** did the dash ask to wait for preheat (wait-to-start lamp lit)? */
  preheatLamp: z.boolean().nullable(),
  plugs: z.array(benchPlugSchema).max(12),
  compression: z.object({
    unit: z.enum(benchPressureUnits),
    cylinders: z.array(benchCylinderSchema).max(12),
  }),
});
export type BenchSheet = z.infer<typeof benchSheetSchema>;

/** One value the loader refused, named by the sheet's field ("plugs.2.resistance", "compression.3.attempts.1"). */
export const benchRefusalSchema = z.object({
  field: z.string(),
  /** the field in words: "Plug 2 resistance", "Cylinder 3, attempt 1" */
  label: z.string(),
  /** the value as it went to the loader, with its unit */
  value: z.string(),
  reason: z.string(),
});
export type BenchRefusal = z.infer<typeof benchRefusalSchema>;

/** 422 { error: { code: "sheet_refused", message, details: { refused } } }: nothing of the sheet was stored. */
export const benchSheetRefusalSchema = z.object({ refused: z.array(benchRefusalSchema) });

/** A reading of the line as the sheet shows it back (canonical unit beside the value as entered). */
export const benchReadingSchema = z.object({
  kind: z.string(),
  position: z.number().int(),
  attempt: z.number().int(),
  value: z.number().nullable(),
  unit: z.string(),
  overRange: z.boolean(),
  rawValue: z.string(),
  rawUnit: z.string().nullable(),
  /** "sheet" when entered on a bench sheet, "export" when loaded from a shop's export */
  source: z.enum(["sheet", "export"]),
  loadedBy: z.string(),
  loadedAt: z.string(),
});
export type BenchReading = z.infer<typeof benchReadingSchema>;

/** GET /api/bench-sheet/lines/:id and the answer to a save. */
export const benchLineDetailSchema = z.object({
  line: benchLineSchema,
  readings: z.array(benchReadingSchema),
  /** the last hour-meter reading entered on a sheet for the line's machine on or after the line opened */
  hourMeter: z.object({ hours: z.number(), readingDate: z.string(), loadedBy: z.string() }).nullable(),
  /**
   * The heater plug of the line's engine family at the parts desk: its part number, the median and 90th-percentile
   * days from order to receipt over the group's lines ordered in the last 12 months of data (null with fewer than
   * 5 lines), whether a line of it at the line's shop is back-ordered and not received, and the lines counted.
   * Null when the family's lines carry no heater-plug part number.
   */
  plugParts: z
    .object({ partNumber: z.string(), typicalWaitDays: z.number().nullable(), p90WaitDays: z.number().nullable(), backOrderedNow: z.boolean(), lines: z.number().int() })
    .nullable(),
  /** the engine family's own figures from the maker's service manual, or null: the generic bands apply */
  familySpec: engineSpecSchema.nullable(),
});
export type BenchLineDetail = z.infer<typeof benchLineDetailSchema>;

export const benchSaveResponseSchema = benchLineDetailSchema.extend({
  /** readings the save added or changed (a value saved again unchanged is not counted) */
  stored: z.number().int(),
});
export type BenchSaveResponse = z.infer<typeof benchSaveResponseSchema>;

/** Line id as the sheet's paths carry it. */
export const benchLineId = (shopCode: string, roNumber: string, lineNo: number) => `${shopCode}|${roNumber}|${lineNo}`;

/** The sheet's API paths (kept here beside the schemas they answer with). */
export const benchSheetPaths = {
  /** GET ?q=: open lines of the user's shops by RO number or serial (benchSearchResponseSchema) */
  search: (q: string) => `/api/bench-sheet/lines?q=${encodeURIComponent(q)}`,
  /** POST benchCreateLineSchema → 201 benchLineDetailSchema */
  lines: () => "/api/bench-sheet/lines",
  /** GET → benchLineDetailSchema */
  line: (id: string) => `/api/bench-sheet/lines/${encodeURIComponent(id)}`,
  /** PUT benchSheetSchema → benchSaveResponseSchema, or 422 sheet_refused with benchSheetRefusalSchema details */
  sheet: (id: string) => `/api/bench-sheet/lines/${encodeURIComponent(id)}/sheet`,
} as const;
