import { z } from "zod";
import { exportKindSchema } from "./imports.js";

/**
 * A mapping profile describes how one shop system writes one export kind. The ETL reads a file through a
 * profile into Ironledger's canonical columns (etl/layouts.ts); the demo generator writes files through the
 * same profile, so both sides share one contract. Profiles are stored in the warehouse, versioned (a saved
 * edit is a new version; every batch records the one it was read with), seeded from etl/profiles/*.json.
 * The admin's profile form validates with this same schema.
 */
const code = z.string().trim().min(1, "a code cannot be blank").max(60, "a code is at most 60 characters");
const codeTable = z.record(code, code).default({});

export const profileIdSchema = z
  .string()
  .trim()
  .regex(/^[a-z0-9-]+$/, "a profile name uses lower-case letters, digits and hyphens only (e.g. shop-system-jobs)")
  .max(60, "a profile name is at most 60 characters");

export const profileSchema = z
  .object({
    id: profileIdSchema,
    description: z.string().max(500, "the description is at most 500 characters"),
    kind: exportKindSchema,
    /** Shop code used when the file has no shop column (a single-shop export). */
    defaultShop: z.string().optional(),
    delimiter: z.enum([",", ";", "\t"]).default(","),
    encoding: z.enum(["utf8", "utf8-bom", "windows-1252"]).default("utf8"),
    dateFormat: z.enum(["iso", "mdy", "dmy"]).default("iso"),
    decimalComma: z.boolean().default(false),
    hoursFormat: z.enum(["decimal", "h:mm"]).default("decimal"),
    /** canonical column name → the header this system writes */
    columns: z.record(
      z.string(),
      z.string().trim().min(1, "a column's header cannot be blank (remove the column instead)").max(200, "a header is at most 200 characters"),
    ),
    units: z
      .object({
        compression: z.enum(["psi", "kPa", "bar", "sniff"]).default("psi"),
        temperature: z.enum(["C", "F"]).default("C"),
        resistance: z.enum(["ohm", "kohm", "suffixed"]).default("ohm"),
        voltage: z.enum(["V"]).default("V"),
      })
      .default({ compression: "psi", temperature: "C", resistance: "ohm", voltage: "V" }),
    /** the shop's own codes → Ironledger's codes, per code table */
    codes: z
      .object({ component: codeTable, model: codeTable, payType: codeTable, measurementKind: codeTable })
      .default({ component: {}, model: {}, payType: {}, measurementKind: {} }),
  })
  .superRefine((p, ctx) => {
    // two columns read from one header would be read from whichever comes first: say so rather than guess
    const seen = new Map<string, string>();
    for (const [canonical, header] of Object.entries(p.columns)) {
      const k = header.trim().toLowerCase();
      const other = seen.get(k);
      if (other) ctx.addIssue({ code: "custom", path: ["columns", canonical], message: `"${header}" is already the header of ${other}; each header can feed one column` });
      else seen.set(k, canonical);
    }
  });
export type Profile = z.infer<typeof profileSchema>;

export const delimiterLabels: Record<Profile["delimiter"], string> = { ",": "comma (,)", ";": "semicolon (;)", "\t": "tab" };
export const encodingLabels: Record<Profile["encoding"], string> = { utf8: "UTF-8", "utf8-bom": "UTF-8 with byte-order mark", "windows-1252": "Windows-1252 (Western European)" };
export const dateFormatLabels: Record<Profile["dateFormat"], string> = { iso: "YYYY-MM-DD", mdy: "MM/DD/YYYY", dmy: "DD.MM.YYYY or DD/MM/YYYY" };
export const codeTableLabels: Record<keyof Profile["codes"], string> = {
  component: "Component codes",
  model: "Model codes",
  payType: "Pay types",
  measurementKind: "Measurement kinds",
};

/** One saved version of a profile, as the admin's list and history show it. */
export const profileVersionInfoSchema = z.object({
  version: z.number().int(),
  savedBy: z.string(),
  savedAt: z.string(),
  note: z.string().nullable(),
});
export type ProfileVersionInfo = z.infer<typeof profileVersionInfoSchema>;

export const profileListSchema = z.object({
  profiles: z.array(
    z.object({
      id: z.string(),
      kind: exportKindSchema,
      description: z.string(),
      latest: profileVersionInfoSchema,
      versions: z.number().int(),
      /** batches read with any version of it */
      batches: z.number().int(),
      /** true while the latest version is the file default (no person has edited it) */
      isDefault: z.boolean(),
    }),
  ),
});
export type ProfileList = z.infer<typeof profileListSchema>;

export const profileDetailSchema = z.object({
  profile: profileSchema,
  version: z.number().int(),
  latestVersion: z.number().int(),
  history: z.array(profileVersionInfoSchema.extend({ batches: z.number().int() })),
  /** the canonical columns of the profile's kind, in the generic layout's order, with those a file must have */
  layout: z.array(z.object({ column: z.string(), required: z.boolean() })),
  /** shop codes a profile may name as its default shop */
  shops: z.array(z.string()),
});
export type ProfileDetail = z.infer<typeof profileDetailSchema>;

/** Saving an edit: the profile, the version it was based on (null for a new profile) and a note on why. */
export const profileSaveSchema = z.object({
  profile: z.unknown(),
  basedOn: z.number().int().positive().nullable(),
  note: z.string().trim().max(300, "the note is at most 300 characters").optional(),
});
export type ProfileSave = z.infer<typeof profileSaveSchema>;
