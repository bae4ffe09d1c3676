import { z } from "zod";

export const rateSchema = z.object({
  rate: z.number(),
  lower: z.number(),
  upper: z.number(),
  per: z.number(),
  level: z.number(),
});
export type Rate = z.infer<typeof rateSchema>;

/** GET /api/analytics/rates/hour-bands: failures per 1,000 engine hours in each engine-hour band. */
export const hourBandRatesSchema = z.object({
  rows: z.array(
    z.object({ band: z.string(), failures: z.number(), engineHours: z.number(), perThousandHours: rateSchema.nullable() }),
  ),
  method: z.string(),
});
export type HourBandRates = z.infer<typeof hourBandRatesSchema>;

/** GET /api/analytics/rates/temperature-bands: failures per 1,000 machine-days by daily-minimum band, in the bands of `unit`, coldest first. */
export const temperatureBandRatesSchema = z.object({
  unit: z.enum(["C", "F"]),
  rows: z.array(
    z.object({
      /** a band id of the unit's set (shared/bands.ts), or "unknown" for days without weather */
      band: z.string(),
      label: z.string(),
      failures: z.number(),
      machineDays: z.number(),
      engineHours: z.number(),
      perThousandMachineDays: rateSchema.nullable(),
      perThousandHours: rateSchema.nullable(),
    }),
  ),
  method: z.string(),
  caution: z.string(),
});
export type TemperatureBandRates = z.infer<typeof temperatureBandRatesSchema>;

/** GET /api/analytics/rates/components: a Pareto of failures by component with the fleet's exposure. */
export const componentRatesSchema = z.object({
  engineHours: z.number(),
  rows: z.array(
    z.object({
      component: z.string(),
      name: z.string(),
      system: z.string(),
      failures: z.number(),
      share: z.number(),
      cumulativeShare: z.number(),
      perThousandHours: rateSchema.nullable(),
    }),
  ),
});
export type ComponentRates = z.infer<typeof componentRatesSchema>;

/**
 * GET /api/analytics/rates/monthly: each month's failures against what its own fleet predicts (observed ÷
 * expected with exact probability limits), the plain rate per 1,000 engine hours with u-chart limits as a
 * second view, and how complete each month's data is. Incomplete months carry no limits and raise no alarm.
 */
export const monthlyRatesSchema = z.object({
  centre: z.number().nullable(),
  /** the months whose hour-band × temperature-band rates give the expectations ('YYYY-MM'); null without any */
  reference: z.object({ from: z.string(), to: z.string(), months: z.number() }).nullable(),
  /** the coverage a month needs to count as complete (0.95) */
  completeCoverage: z.number(),
  /** the months left out, in words; null when every month is complete */
  incompleteNote: z.string().nullable(),
  /** one sentence per month outside the observed ÷ expected limits */
  flagged: z.array(z.object({ month: z.string(), direction: z.enum(["above", "below"]), words: z.string() })),
  rows: z.array(
    z.object({
      month: z.string(),
      failures: z.number(),
      engineHours: z.number(),
      perThousandHours: rateSchema.nullable(),
      /** share of the month's in-service machine-days that hour readings cover (0–1); null when unknown */
      coverage: z.number().nullable(),
      complete: z.boolean(),
      /** failures the month's hours by hour band × temperature band predict at the reference rates */
      expected: z.number(),
      /** observed ÷ expected with its exact probability limits (null: incomplete month or no expectation) */
      ratio: z.number().nullable(),
      ratioLower: z.number().nullable(),
      ratioUpper: z.number().nullable(),
      /** plain u-chart limits on the rate per 1,000 h (complete months only) */
      controlLower: z.number().nullable(),
      controlUpper: z.number().nullable(),
      /** outside the observed ÷ expected limits (never for an incomplete month) */
      outOfControl: z.boolean(),
      /** outside the plain u-chart limits (the second view; never for an incomplete month) */
      outOfControlPlain: z.boolean(),
    }),
  ),
  method: z.string(),
  plainMethod: z.string(),
});
export type MonthlyRates = z.infer<typeof monthlyRatesSchema>;

/** GET /api/analytics/rates/compare: two lots, engine families or shops compared on failures per 1,000 engine hours. */
export const rateCompareQuerySchema = z.object({
  compareBy: z.enum(["lot", "engineFamily", "shop"], { error: "compareBy must be lot, engineFamily or shop" }),
  /** group A */
  a: z.string({ error: "name group A with a=…" }).trim().min(1, { error: "name group A with a=…" }).max(40),
  /** group B; without it, everything else in the filters */
  b: z.string().trim().max(40).optional(),
  /** one component's failures (code); without it, every component */
  component: z.string().max(40).optional(),
});
export type RateCompareQuery = z.infer<typeof rateCompareQuerySchema>;

const compareGroupSchema = z.object({ label: z.string(), failures: z.number(), engineHours: z.number(), perThousandHours: rateSchema.nullable() });

export const rateComparisonSchema = z.object({
  compareBy: z.enum(["lot", "engineFamily", "shop"]),
  component: z.string().nullable(),
  a: compareGroupSchema,
  b: compareGroupSchema,
  /** null when either group has no exposure or neither has a failure */
  comparison: z
    .object({
      ratio: z.number().nullable(),
      lower: z.number(),
      upper: z.number().nullable(),
      level: z.number(),
      pValue: z.number(),
      expectedA: z.number(),
    })
    .nullable(),
  /** the result in words, e.g. "Lot A fails 2.4 times as often as lot B per 1,000 engine hours (95 % CI 1.3–4.4, p = 0.004)" */
  sentence: z.string(),
  method: z.string(),
});
export type RateComparisonAnswer = z.infer<typeof rateComparisonSchema>;

/** GET /api/analytics/rates/costs: repair cost per 1,000 engine hours by component and shop. */
export const costRatesSchema = z.object({
  currency: z.string(),
  method: z.string(),
  shops: z.array(z.object({ shop: z.string(), engineHours: z.number(), cost: z.number(), lines: z.number(), perThousandHours: z.number().nullable() })),
  components: z.array(z.object({ component: z.string(), name: z.string(), cost: z.number(), lines: z.number(), perThousandHours: z.number().nullable() })),
  rows: z.array(
    z.object({
      shop: z.string(),
      component: z.string(),
      name: z.string(),
      lines: z.number(),
      partsCost: z.number(),
      labourCost: z.number(),
      cost: z.number(),
      engineHours: z.number(),
      perThousandHours: z.number().nullable(),
    }),
  ),
  engineHours: z.number(),
  cost: z.number(),
  perThousandHours: z.number().nullable(),
});
export type CostRates = z.infer<typeof costRatesSchema>;
