import { z } from "zod";
import { hourBands, temperatureBandIds } from "../bands.js";

/** A list in a query string: "a,b" or repeated keys; empty items dropped, duplicates removed. */
const list = <T extends z.ZodType<string>>(item: T) =>
  z.preprocess((v) => {
    if (v === undefined || v === null || v === "") return [];
    const arr = Array.isArray(v) ? v : [v];
    return [...new Set(arr.flatMap((x) => String(x).split(",")).map((s) => s.trim()).filter(Boolean))];
  }, z.array(item));

const isoDate = z.iso.date({ error: "use a date like 2024-01-31" });
const month = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, { error: "use a month like 2021-09" });
const hourBandId = z.enum(hourBands.map((b) => b.id) as [string, ...string[]]);
/** a band of either unit's set (shared/bands.ts); a filter selects the days of its band whatever the unit shown */
const tempBandId = z.enum(temperatureBandIds as [string, ...string[]]);

/**
 * The shared analytics filters, as query-string parameters. Every analytics route accepts them;
 * the server applies the caller's shop scope on top.
 */
export const analyticsFiltersSchema = z
  .object({
    from: isoDate.optional(),
    to: isoDate.optional(),
    shops: list(z.string().regex(/^[A-Z0-9-]{1,16}$/i)),
    engineFamilies: list(z.string().max(32)),
    modelLines: list(z.string().max(32)),
    components: list(z.string().max(40)),
    buildFrom: month.optional(),
    buildTo: month.optional(),
    lots: list(z.string().max(40)),
    tempBands: list(tempBandId),
    hourBands: list(hourBandId),
    /** the temperature unit of the bands the answers are grouped by (and of the words); the filters do not depend on it */
    unit: z.enum(["C", "F"]).default("C"),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { error: "The From date is after the To date", path: ["to"] })
  .refine((f) => !f.buildFrom || !f.buildTo || f.buildFrom <= f.buildTo, {
    error: "The first build month is after the last",
    path: ["buildTo"],
  });
export type AnalyticsFilters = z.infer<typeof analyticsFiltersSchema>;
export type AnalyticsFiltersInput = z.input<typeof analyticsFiltersSchema>;

/** Filters as URL search params (client: links reproduce a view; server: same parser). */
export function filtersToSearchParams(f: Partial<AnalyticsFilters>): URLSearchParams {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(f)) {
    if (v === undefined || v === null) continue;
    if (Array.isArray(v)) {
      if (v.length) p.set(k, v.join(","));
    } else p.set(k, String(v));
  }
  return p;
}
