import { z } from "zod";
import { KPA_PER_PSI, toKpa } from "../format.js";
import type { FamilyCompression } from "../measurement-interpretation.js";
import type { ThresholdSource } from "../threshold-source.js";

/**
 * An engine family's own figures, typed by an administrator from the maker's service manual: the compression
 * target range and allowable minimum (in psi, kPa or bar as typed; kept in psi) and, optionally, the heater
 * plug's healthy maximum resistance. Versioned: a save is the family's next version and never changes an old one.
 * Where a family has figures, the bench sheet, the repair record and the claim packet judge against them;
 * where it has none, the generic bands stay.
 */

export const engineSpecUnits = ["psi", "kPa", "bar"] as const;
export type EngineSpecUnit = (typeof engineSpecUnits)[number];

/** A gauge value in psi, through kPa with the factors of NIST SP 811 (2008) Appendix B.8 (shared/format.ts). */
export const specPsi = (value: number, unit: EngineSpecUnit): number => (unit === "psi" ? value : toKpa(value, unit) / KPA_PER_PSI);

/** The highest compression figure taken, in psi: far above any diesel of this class, so a slip of the unit is caught. */
export const SPEC_MAX_PSI = 1000;
/** The highest plug maximum taken, in Ω: above it a plug is open (shared/measurement-interpretation.ts, from memory). */
export const SPEC_MAX_PLUG_OHMS = 10;

export const engineSpecFamilySchema = z
  .string({ error: "the engine family is required" })
  .trim()
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/, "an engine family is letters, digits, dots and dashes (at most 40), starting with a letter or digit");

const pressure = (what: string) =>
  z.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be a number`).refine((v) => v > 0, `${what} must be above zero`);

/** What one version holds, as typed. */
export const engineSpecInputSchema = z
  .object({
    unit: z.enum(engineSpecUnits, { error: "the unit must be psi, kPa or bar" }),
    targetMin: pressure("The target's low end"),
    targetMax: pressure("The target's high end"),
    allowableMin: pressure("The allowable minimum"),
    plugHealthyMaxOhms: z
      .number({ error: "the plug's healthy maximum must be a number of ohms, or left empty" })
      .refine((v) => v > 0, "the plug's healthy maximum must be above zero")
      .refine((v) => v <= SPEC_MAX_PLUG_OHMS, `the plug's healthy maximum must be at most ${SPEC_MAX_PLUG_OHMS} Ω (above it a plug reads open)`)
      .nullable(),
    source: z
      .string({ error: "say where the figures come from" })
      .trim()
      .min(3, "say where the figures come from (at least 3 characters), such as the manual's section and table")
      .max(200, "the source is at most 200 characters"),
  })
  .superRefine((s, ctx) => {
    if (!(s.targetMin > 0 && s.targetMax > 0 && s.allowableMin > 0)) return;
    if (s.allowableMin > s.targetMin) {
      ctx.addIssue({ code: "custom", path: ["allowableMin"], message: `the allowable minimum (${s.allowableMin} ${s.unit}) is above the target's low end (${s.targetMin} ${s.unit}); the minimum must be at or below the target` });
    }
    if (s.targetMin > s.targetMax) {
      ctx.addIssue({ code: "custom", path: ["targetMax"], message: `the target's high end (${s.targetMax} ${s.unit}) is below its low end (${s.targetMin} ${s.unit})` });
    }
    if (specPsi(s.targetMax, s.unit) > SPEC_MAX_PSI) {
      ctx.addIssue({ code: "custom", path: ["targetMax"], message: `the target's high end (${s.targetMax} ${s.unit}) is above ${SPEC_MAX_PSI} psi: check the unit` });
    }
  });
export type EngineSpecInput = z.infer<typeof engineSpecInputSchema>;

/** Saving the family's next version: the figures, the version the edit started from (null: the family's first), and why. */
export const engineSpecSaveSchema = z.object({
  spec: engineSpecInputSchema,
  basedOn: z.number({ error: "say which version the edit started from (null for the first)" }).int().positive().nullable(),
  note: z
    .string({ error: "say why the figures change" })
    .trim()
    .min(3, "say why the figures change (at least 3 characters)")
    .max(300, "the note is at most 300 characters"),
});
export type EngineSpecSave = z.infer<typeof engineSpecSaveSchema>;

/** One stored version: the figures in psi, the unit they were typed in, who saved them, when and why. */
export const engineSpecSchema = z.object({
  engineFamily: z.string(),
  version: z.number().int(),
  enteredUnit: z.enum(engineSpecUnits),
  targetMinPsi: z.number(),
  targetMaxPsi: z.number(),
  allowableMinPsi: z.number(),
  plugHealthyMaxOhms: z.number().nullable(),
  source: z.string(),
  savedBy: z.string(),
  savedAt: z.string(),
  note: z.string(),
});
export type EngineSpec = z.infer<typeof engineSpecSchema>;

/** GET /api/admin/engine-specs: every engine family with its current figures, or null while it has none. */
export const engineSpecListSchema = z.object({
  families: z.array(z.object({ engineFamily: z.string(), description: z.string().nullable(), current: engineSpecSchema.nullable(), versions: z.number().int() })),
});
export type EngineSpecList = z.infer<typeof engineSpecListSchema>;

/** GET /api/admin/engine-specs/:family and the answer to a save: the current figures and every version, newest first. */
export const engineSpecDetailSchema = z.object({
  engineFamily: z.string(),
  description: z.string().nullable(),
  current: engineSpecSchema.nullable(),
  history: z.array(engineSpecSchema),
});
export type EngineSpecDetail = z.infer<typeof engineSpecDetailSchema>;

/** GET /api/engine-specs/:family (any signed-in user): the figures the readings are judged against, or null. */
export const engineSpecCurrentSchema = z.object({ engineFamily: z.string(), current: engineSpecSchema.nullable() });
export type EngineSpecCurrent = z.infer<typeof engineSpecCurrentSchema>;

export const engineSpecPaths = {
  adminList: () => "/api/admin/engine-specs",
  admin: (family: string) => `/api/admin/engine-specs/${encodeURIComponent(family)}`,
  current: (family: string) => `/api/engine-specs/${encodeURIComponent(family)}`,
} as const;

/** Where a family's figures come from, as the verdicts name it (shared/threshold-source.ts). */
export const engineSpecSource = (s: EngineSpec): ThresholdSource => ({
  kind: "maker-manual",
  enteredBy: s.savedBy,
  family: { code: s.engineFamily, version: s.version, reference: s.source },
});

/** A family's compression figures as the verdicts take them (psi), with their source. */
export const familyCompressionOf = (s: EngineSpec): FamilyCompression => ({
  targetMin: s.targetMinPsi,
  targetMax: s.targetMaxPsi,
  allowableMin: s.allowableMinPsi,
  source: engineSpecSource(s),
});

/** A family's healthy maximum plug resistance with its source, or null when the family gives none. */
export const familyPlugLimitOf = (s: EngineSpec | null): { healthyMaxOhms: number; source: ThresholdSource } | null =>
  s && s.plugHealthyMaxOhms !== null ? { healthyMaxOhms: s.plugHealthyMaxOhms, source: engineSpecSource(s) } : null;
