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

/** GET /api/analytics/rates/temperature-bands: failures per 1,000 machine-days by daily-minimum band. */
export const temperatureBandRatesSchema = z.object({
  rows: z.array(
    z.object({
      band: z.string(),
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

/** GET /api/analytics/rates/monthly: failures per 1,000 engine hours by month with u-chart limits. */
export const monthlyRatesSchema = z.object({
  centre: z.number().nullable(),
  rows: z.array(
    z.object({
      month: z.string(),
      failures: z.number(),
      engineHours: z.number(),
      perThousandHours: rateSchema.nullable(),
      controlLower: z.number().nullable(),
      controlUpper: z.number().nullable(),
      outOfControl: z.boolean(),
    }),
  ),
  method: z.string(),
});
export type MonthlyRates = z.infer<typeof monthlyRatesSchema>;
