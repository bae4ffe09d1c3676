import { z } from "zod";

export const lifeQuerySchema = z.object({
  component: z.string().max(40).default("ENG-CSA-HPLUG"),
  compareBy: z.enum(["lot", "engineFamily", "climate", "shop"]).optional(),
  /** group A: units whose compareBy attribute equals this value; group B: the rest (or compareOther) */
  compareValue: z.string().max(40).optional(),
  compareOther: z.string().max(40).optional(),
  /** which B-life to report beside the fits: Bn = age by which n % have failed, n from 1 to 50 */
  bLife: z.coerce
    .number({ error: "bLife must be a whole number from 1 to 50" })
    .int({ error: "bLife must be a whole number from 1 to 50" })
    .min(1, { error: "bLife must be a whole number from 1 to 50" })
    .max(50, { error: "bLife must be a whole number from 1 to 50" })
    .default(10),
});
export type LifeQuery = z.infer<typeof lifeQuerySchema>;

const interval = z.object({ lower: z.number().nullable(), upper: z.number().nullable(), level: z.number() });

/** A B-life (the age by which `percent` % have failed) with its interval; null limits are unbounded / not reached. */
export const bLifeSchema = z.object({
  percent: z.number(),
  estimate: z.number().nullable(),
  lower: z.number().nullable(),
  upper: z.number().nullable(),
  level: z.number(),
});
export type BLife = z.infer<typeof bLifeSchema>;

export const weibullFitSummarySchema = z.discriminatedUnion("status", [
  z.object({
    status: z.literal("fitted"),
    units: z.number(),
    failures: z.number(),
    shape: z.number(),
    scale: z.number(),
    b10: z.number(),
    shapeInterval: interval.nullable(),
    scaleInterval: interval.nullable(),
    b10Interval: interval.nullable(),
    /** the requested B-life (lifeQuery.bLife) from the fit, with its profile-likelihood-ratio interval */
    bLife: bLifeSchema,
    logLikelihood: z.number(),
  }),
  z.object({ status: z.literal("insufficient"), units: z.number(), failures: z.number(), reason: z.string() }),
]);
export type WeibullFitSummary = z.infer<typeof weibullFitSummarySchema>;

const groupSchema = z.object({
  label: z.string(),
  fit: weibullFitSummarySchema,
  points: z.array(z.object({ time: z.number(), medianRank: z.number() })),
  line: z.array(z.object({ time: z.number(), F: z.number(), lower: z.number(), upper: z.number() })),
});

/** GET /api/analytics/life/weibull */
export const weibullResponseSchema = z.object({
  component: z.string(),
  method: z.string(),
  groups: z.array(groupSchema),
  comparison: z
    .object({
      scaleRatio: z.object({ estimate: z.number(), lower: z.number().nullable(), upper: z.number().nullable(), level: z.number() }),
      hazardRatio: z.object({ estimate: z.number(), lower: z.number().nullable(), upper: z.number().nullable(), level: z.number() }),
      commonShape: z.number(),
      sameDistribution: z.object({ hypothesis: z.string(), statistic: z.number(), df: z.number(), pValue: z.number() }),
      sameShape: z.object({ hypothesis: z.string(), statistic: z.number(), df: z.number(), pValue: z.number() }),
    })
    .nullable(),
});
export type WeibullResponse = z.infer<typeof weibullResponseSchema>;

/** GET /api/analytics/life/kaplan-meier */
export const kaplanMeierResponseSchema = z.object({
  component: z.string(),
  method: z.string(),
  groups: z.array(
    z.object({
      label: z.string(),
      units: z.number(),
      failures: z.number(),
      steps: z.array(z.object({ time: z.number(), atRisk: z.number(), survival: z.number(), lower: z.number().nullable(), upper: z.number().nullable() })),
      /** the requested B-life read off the curve (R survival quantile.survfit conventions), 95 % limits */
      bLife: bLifeSchema,
    }),
  ),
  logRank: z.object({ statistic: z.number(), pValue: z.number() }).nullable(),
});
export type KaplanMeierResponse = z.infer<typeof kaplanMeierResponseSchema>;

/** GET /api/analytics/life/mcf */
export const mcfResponseSchema = z.object({
  component: z.string(),
  method: z.string(),
  groups: z.array(
    z.object({
      label: z.string(),
      machines: z.number(),
      repairs: z.number(),
      slopePerThousandHours: z.number().nullable(),
      steps: z.array(z.object({ age: z.number(), mcf: z.number(), lower: z.number(), upper: z.number(), atRisk: z.number() })),
    }),
  ),
});
export type McfResponse = z.infer<typeof mcfResponseSchema>;

/** GET /api/analytics/life/cost-mcf: Nelson's cost mean cumulative function of one component's repairs. */
export const costMcfResponseSchema = z.object({
  component: z.string(),
  method: z.string(),
  currency: z.string(),
  groups: z.array(
    z.object({
      label: z.string(),
      machines: z.number(),
      repairs: z.number(),
      totalCost: z.number(),
      /** mean cost per machine per 1,000 h over the observed range (secant of the curve) */
      slopePerThousandHours: z.number().nullable(),
      steps: z.array(z.object({ age: z.number(), mcf: z.number(), lower: z.number(), upper: z.number(), atRisk: z.number() })),
    }),
  ),
});
export type CostMcfResponse = z.infer<typeof costMcfResponseSchema>;
