import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { lifeQuerySchema, type WeibullResponse } from "../../shared/schemas/analytics-life.js";
import { lifeUnits } from "../db/queries/analytics-life.js";
import { lifeOnWorker } from "./life-curves/life-pool.js";
import { lifeComparisonWords, type LifeSide } from "../analytics/comparison-words.js";

const ALL = "all";

/**
 * The life comparison of a supplier-lot finding: the part's Weibull fit for the lot against the other lots of the
 * same engine family (or of every family when the finding names none), through the same fits as the Life page,
 * in words. Null for a finding without a lot or part, or when either side cannot be fitted.
 */
export async function findingLifeWords(
  db: Db,
  scope: ShopScope,
  f: { part: string | null; partName: string; lead: { dimensions: { supplierLot: string; engineFamily: string } } },
): Promise<string | null> {
  const lot = f.lead.dimensions.supplierLot;
  const family = f.lead.dimensions.engineFamily;
  if (!f.part || lot === ALL) return null;
  const filters = analyticsFiltersSchema.parse(family !== ALL ? { engineFamilies: family } : {});
  const q = lifeQuerySchema.parse({ component: f.part, compareBy: "lot", compareValue: lot });
  const fit = (await lifeOnWorker({ kind: "weibull", units: await lifeUnits(db, scope, filters, f.part), q, cold: new Set<string>() })) as WeibullResponse;
  if (fit.groups.length < 2) return null;
  const side = (g: WeibullResponse["groups"][number], label: string): LifeSide => ({
    label,
    b10: g.fit.status === "fitted" ? g.fit.b10 : null,
    units: g.fit.units,
    failures: g.fit.failures,
  });
  const plural = f.partName.toLowerCase().endsWith("s") ? f.partName.toLowerCase() : `${f.partName.toLowerCase()}s`;
  return lifeComparisonWords(plural, side(fit.groups[0], `lot ${lot}`), side(fit.groups[1], family !== ALL ? `the other lots of engine family ${family}` : "the other lots"));
}
