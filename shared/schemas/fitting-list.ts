import { z } from "zod";
import type { Role } from "../roles.js";

/** Who reads the winter-readiness page and the fitting list: a manager for their own shops, the others group-wide. */
export const winterReadinessRoles = ["analyst", "director", "manager", "admin"] as const satisfies readonly Role[];

/** Why a machine is on the block-heater fitting list, and so where it sorts. */
export const fittingPrioritySchema = z.enum(["clean-socket", "old-cold-start-parts"]);
export type FittingPriority = z.infer<typeof fittingPrioritySchema>;

/** One machine at a cold shop without a block heater. */
export const fittingRowSchema = z.object({
  shopCode: z.string(),
  shopName: z.string(),
  serial: z.string(),
  modelLine: z.string(),
  engineFamily: z.string(),
  deliveryDate: z.string(),
  /** whole calendar months from delivery to the list's date */
  ageMonths: z.number(),
  /** latest valid engine hours (continuous across meter replacements); null when the machine has no reading */
  hourMeter: z.number().nullable(),
  /** engine hours since the cold-start parts (heater plugs or grid heater) were last fitted; null without readings */
  coldStartPartHours: z.number().nullable(),
  /** the date those parts were fitted: the last replacement, or delivery */
  coldStartPartFitted: z.string(),
  coldStartPartName: z.string(),
  priority: fittingPrioritySchema,
  /** the reason in words */
  why: z.string(),
});
export type FittingRow = z.infer<typeof fittingRowSchema>;

/** GET /api/winter/fitting */
export const fittingListSchema = z.object({
  /** the list's date: the last day with data */
  asOf: z.string(),
  /** the cold shops in the caller's scope, by code */
  coldShops: z.array(z.object({ code: z.string(), name: z.string() })),
  /** shops in scope that are not cold, by code (said on the page so an empty list reads right) */
  otherShops: z.array(z.string()),
  /** how a shop is judged cold, in words */
  coldRule: z.string(),
  /** how the list is ordered, in words */
  orderRule: z.string(),
  /** machines delivered at most this many months ago come first */
  cleanSocketMonths: z.number(),
  rows: z.array(fittingRowSchema),
  /** the block-heater cautions and the deference to the maker's manual and local codes */
  cautions: z.array(z.string()),
});
export type FittingList = z.infer<typeof fittingListSchema>;
