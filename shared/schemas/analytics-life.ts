import { z } from "zod";

export const lifeQuerySchema = z.object({
  component: z.string().max(40).default("ENG-CSA-HPLUG"),
  compareBy: z.enum(["lot", "engineFamily", "climate", "shop"]).optional(),
  /** group A: units whose compareBy attribute equals this value; group B: the rest (or compareOther) */
  compareValue: z.string().max(40).optional(),
  compareOther: z.string().max(40).optional(),
});
export type LifeQuery = z.infer<typeof lifeQuerySchema>;

const interval = z.object({ lower: z.number().nullable(), upper: z.number().nullable(), level: z.number() });

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
