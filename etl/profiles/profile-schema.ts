import { z } from "zod";

/**
 * A mapping profile describes how one shop system writes one export kind.
 * The ETL reads a file through a profile into Ironledger's canonical columns (etl/layouts.ts);
 * the demo generator writes files through the same profile, so both sides share one contract.
 */
export const exportKindSchema = z.enum(["machines", "jobs", "measurements", "weather", "hours"]);
export type ExportKind = z.infer<typeof exportKindSchema>;

export const profileSchema = z.object({
  id: z.string().regex(/^[a-z0-9-]+$/),
  description: z.string(),
  kind: exportKindSchema,
  /** Shop code used when the file has no shop column (a single-shop export). */
  defaultShop: z.string().optional(),
  delimiter: z.enum([",", ";", "\t"]).default(","),
  encoding: z.enum(["utf8", "utf8-bom", "windows-1252"]).default("utf8"),
  dateFormat: z.enum(["iso", "mdy", "dmy"]).default("iso"),
  decimalComma: z.boolean().default(false),
  hoursFormat: z.enum(["decimal", "h:mm"]).default("decimal"),
  /** canonical column name → the header this system writes */
  columns: z.record(z.string(), z.string()),
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
    .object({
      component: z.record(z.string(), z.string()).default({}),
      model: z.record(z.string(), z.string()).default({}),
      payType: z.record(z.string(), z.string()).default({}),
      measurementKind: z.record(z.string(), z.string()).default({}),
    })
    .default({ component: {}, model: {}, payType: {}, measurementKind: {} }),
});
export type Profile = z.infer<typeof profileSchema>;
