import { z } from "zod";

const isoDate = z.iso.date({ error: "use a date like 2024-11-01" });

/** GET /api/winter/forecast and GET /api/winter/backtest query. */
export const winterForecastQuerySchema = z
  .object({
    /** first day of the forecast period; default the winter ahead of the data's end (server/analytics/winter-forecast.ts nextSeason) */
    from: isoDate.optional(),
    /** last day of the forecast period (inclusive); default 31 March after `from` */
    to: isoDate.optional(),
    /** the chance that the shop's stock covers demand over the lead time; 0.5–0.999 */
    serviceLevel: z.coerce
      .number({ error: "Service level should be a number from 0.5 to 0.999" })
      .min(0.5, { error: "Service level should be a number from 0.5 to 0.999" })
      .max(0.999, { error: "Service level should be a number from 0.5 to 0.999" })
      .default(0.9),
    /** the temperature unit the band table is shown in */
    unit: z.enum(["C", "F"]).default("F"),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { error: "The From date is after the To date", path: ["to"] })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) - Date.parse(q.from) <= 731 * 86_400_000, {
    error: "The period is at most two years long",
    path: ["to"],
  });
export type WinterForecastQuery = z.infer<typeof winterForecastQuerySchema>;

/** A Weibull fit used by the forecast: one per component × engine family, or × lot where a lot is fitted apart. */
export const winterFitSchema = z.object({
  component: z.string(),
  engineFamily: z.string(),
  /** null: all lots together (the lots not fitted apart) */
  lot: z.string().nullable(),
  shape: z.number(),
  scale: z.number(),
  units: z.number(),
  failures: z.number(),
});
export type WinterFit = z.infer<typeof winterFitSchema>;

/** Measured failure-rate ratio of one daily-minimum band (coldest first), relative to the whole data. */
export const winterBandSchema = z.object({
  /** the component the ratio was measured on */
  component: z.string(),
  band: z.string(),
  label: z.string(),
  failures: z.number(),
  machineDays: z.number(),
  /** failures per machine-day in the band ÷ failures per machine-day overall */
  rateRatio: z.number(),
  /** share of past season days in this band over the data the fits came from (w_fit) */
  fitShare: z.number(),
});
export type WinterBand = z.infer<typeof winterBandSchema>;

/** Order → receipt days for one part number, from back-ordered lines ordered in past winters. */
export const winterLeadTimeSchema = z.object({
  partNumber: z.string(),
  component: z.string(),
  backOrderedLines: z.number(),
  medianDays: z.number().nullable(),
  p90Days: z.number().nullable(),
  /** the lead time the stock advice plans with (the 90th percentile, or the fallback when no lines) */
  planningDays: z.number(),
  basis: z.string(),
});
export type WinterLeadTime = z.infer<typeof winterLeadTimeSchema>;

/** The per shop × component calibration: observed against expected failures over past winters. */
export const winterCalibrationSchema = z.object({
  /** a: expected failures added to both sides, pulling the ratio towards 1 */
  prior: z.number(),
  /** the past winters the calibration was learned from, newest first */
  seasons: z.array(z.object({ from: z.string(), to: z.string() })),
  cells: z.array(
    z.object({
      shopCode: z.string(),
      component: z.string(),
      /** counted failures in the past winters */
      observed: z.number(),
      /** failures the model, rebuilt before each winter, expected */
      expected: z.number(),
      /** (observed + prior) ÷ (expected + prior) */
      ratio: z.number(),
    }),
  ),
});
export type WinterCalibration = z.infer<typeof winterCalibrationSchema>;

/** One shop × part number: the forecast and the stock advice. */
export const winterForecastRowSchema = z.object({
  shopCode: z.string(),
  shopName: z.string(),
  component: z.string(),
  componentName: z.string(),
  partNumber: z.string(),
  /** machines at the shop at the data's end that carry the part */
  machines: z.number(),
  /** k = Σ w_shop·RR ÷ Σ w_fit·RR */
  coldFactor: z.number(),
  /** the shop's share of past season days per band (w_shop), in the order of `bands` */
  climateShares: z.array(z.number()),
  /** the shop × component calibration ratio multiplied into the hazard */
  calibration: z.number(),
  /** Σ p before calibration */
  modelExpected: z.number(),
  /** engine hours the machines run in the period, summed */
  periodHours: z.number(),
  /** expected failures in the period: Σ p */
  expected: z.number(),
  /** 5 % and 95 % points of the Poisson-binomial count */
  lower: z.number(),
  upper: z.number(),
  /** expected failures per day of the period */
  perDay: z.number(),
  leadTimeDays: z.number(),
  /** mean demand over the lead time: perDay × leadTimeDays */
  leadTimeDemand: z.number(),
  /** smallest q with P(D ≤ q) ≥ service level, D ~ Poisson(leadTimeDemand) */
  hold: z.number(),
  onHand: z.number().nullable(),
  /** max(0, hold − onHand); equals hold when nothing is entered */
  gap: z.number(),
  /** period start − planning lead time */
  orderBy: z.string(),
  /** the order-by date is on or before today */
  orderNow: z.boolean(),
});
export type WinterForecastRow = z.infer<typeof winterForecastRowSchema>;

/** GET /api/winter/forecast */
export const winterForecastSchema = z.object({
  period: z.object({ from: z.string(), to: z.string(), days: z.number(), months: z.number() }),
  /** the last day with data */
  dataEnd: z.string(),
  /** the day the order-by dates are compared with */
  today: z.string(),
  serviceLevel: z.number(),
  unit: z.enum(["C", "F"]),
  fits: z.array(winterFitSchema),
  bands: z.array(winterBandSchema),
  leadTimes: z.array(winterLeadTimeSchema),
  rows: z.array(winterForecastRowSchema),
  calibration: winterCalibrationSchema,
  /** the method in words, shown beside the numbers */
  method: z.string(),
  /** what the interval leaves out */
  intervalNote: z.string(),
  stockMethod: z.string(),
  caution: z.string(),
});
export type WinterForecast = z.infer<typeof winterForecastSchema>;

/** One shop (all cold-start parts together, or one component) in the held-out season. */
export const winterBacktestRowSchema = z.object({
  shopCode: z.string(),
  shopName: z.string(),
  /** null: all cold-start-aid components together */
  component: z.string().nullable(),
  machines: z.number(),
  forecast: z.number(),
  lower: z.number(),
  upper: z.number(),
  actual: z.number(),
  /** actual − forecast */
  error: z.number(),
  /** (actual − forecast) ÷ forecast; null when the forecast is 0 */
  relativeError: z.number().nullable(),
  inside: z.boolean(),
  /** the shop × component calibration ratio; null on a shop's all-components row */
  calibration: z.number().nullable(),
  /** the model before calibration: Σ p and the 5 % / 95 % points of its Poisson-binomial count */
  modelForecast: z.number(),
  modelLower: z.number(),
  modelUpper: z.number(),
  modelInside: z.boolean(),
});
export type WinterBacktestRow = z.infer<typeof winterBacktestRowSchema>;

/** GET /api/winter/backtest: the last complete winter held out and forecast from the data before it. */
export const winterBacktestSchema = z.object({
  season: z.object({ from: z.string(), to: z.string() }),
  /** every input of the forecast came from data before this day */
  trainedBefore: z.string(),
  /** per shop, all cold-start parts together */
  shops: z.array(winterBacktestRowSchema),
  /** per shop × component */
  rows: z.array(winterBacktestRowSchema),
  total: z.object({
    forecast: z.number(),
    lower: z.number(),
    upper: z.number(),
    actual: z.number(),
    inside: z.boolean(),
    modelForecast: z.number(),
    modelLower: z.number(),
    modelUpper: z.number(),
  }),
  /** `modelInside`: shops inside the interval of the model before calibration */
  coverage: z.object({ inside: z.number(), shops: z.number(), share: z.number(), level: z.number(), modelInside: z.number() }),
  fits: z.array(winterFitSchema),
  calibration: winterCalibrationSchema,
  method: z.string(),
});
export type WinterBacktest = z.infer<typeof winterBacktestSchema>;

/** A part number's stock on hand at one shop, as a user entered it. */
export const winterStockRowSchema = z.object({
  shopCode: z.string(),
  shopName: z.string(),
  partNumber: z.string(),
  quantity: z.number(),
  updatedBy: z.string(),
  updatedAt: z.string(),
});
export type WinterStockRow = z.infer<typeof winterStockRowSchema>;

/** GET /api/winter/stock */
export const winterStockSchema = z.object({ rows: z.array(winterStockRowSchema) });
export type WinterStock = z.infer<typeof winterStockSchema>;

/** PUT /api/winter/stock body */
export const winterStockInputSchema = z.strictObject({
  shopCode: z.string({ error: "Shop should be a shop code" }).trim().min(1, { error: "Shop is empty; choose a shop" }).max(20),
  partNumber: z.string({ error: "Part number should be text" }).trim().min(1, { error: "Part number is empty; write one" }).max(40),
  quantity: z
    .number({ error: "Quantity should be a whole number of 0 or more" })
    .int({ error: "Quantity should be a whole number of 0 or more" })
    .min(0, { error: "Quantity should be a whole number of 0 or more" })
    .max(100_000, { error: "Quantity is at most 100,000" }),
});
export type WinterStockInput = z.infer<typeof winterStockInputSchema>;
