import { z } from "zod";

/** Comeback window settings (DOMAIN.md §3, common practice): 7–90 days (30 usual) and 50–200 engine hours (100 usual). */
export const COMEBACK_DAYS = { min: 7, max: 90, default: 30 } as const;
export const COMEBACK_HOURS = { min: 50, max: 200, default: 100 } as const;
/** Below this many lines a shop's proportion is not rated (DOMAIN.md §3, common practice). */
export const MINIMUM_LINES = 30;

export const periodKindSchema = z.enum(["month", "quarter", "year", "rolling12", "all"]);
export type PeriodKind = z.infer<typeof periodKindSchema>;
export const periodKindLabels: Record<PeriodKind, string> = {
  month: "Month",
  quarter: "Quarter",
  year: "Year",
  rolling12: "12 months to",
  all: "Every month to",
};

const monthSchema = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "a month as YYYY-MM");

/** Query of every /api/benchmarks route: the period (a month inside it; the last month for rolling12 and all) and the comeback window. */
export const benchmarkQuerySchema = z.object({
  period: periodKindSchema.default("rolling12"),
  at: monthSchema.optional(),
  days: z.coerce.number().int().min(COMEBACK_DAYS.min).max(COMEBACK_DAYS.max).default(COMEBACK_DAYS.default),
  hours: z.coerce.number().int().min(COMEBACK_HOURS.min).max(COMEBACK_HOURS.max).default(COMEBACK_HOURS.default),
});
export type BenchmarkQuery = z.infer<typeof benchmarkQuerySchema>;
export type BenchmarkQueryInput = z.input<typeof benchmarkQuerySchema>;

export const trendQuerySchema = benchmarkQuerySchema.extend({
  months: z.coerce.number().int().min(3).max(36).default(12),
});
export type TrendQuery = z.infer<typeof trendQuerySchema>;

export const comebackPairsQuerySchema = benchmarkQuerySchema.extend({
  shop: z.string().min(1).max(20),
  technician: z.string().min(1).max(40).optional(),
});
export type ComebackPairsQuery = z.infer<typeof comebackPairsQuerySchema>;

export const periodSchema = z.object({
  kind: periodKindSchema,
  /** "2025-05", "2025-Q2", "2025", "12m-2025-05", "all-2025-05" */
  key: z.string(),
  label: z.string(),
  from: z.string(),
  to: z.string(),
  /** last date with repair data anywhere in the group */
  asOf: z.string(),
  /** lines closed after this date still have an open comeback window and are left out */
  countedThrough: z.string(),
  complete: z.boolean(),
  /** first and last month that can be chosen (the last is the latest whose window has elapsed) */
  firstMonth: z.string(),
  lastMonth: z.string(),
});
export type Period = z.infer<typeof periodSchema>;

export const settingsSchema = z.object({ days: z.number(), hours: z.number() });

/**
 * Why the group's totals and rates are withheld from this caller, in words; null when they are shown. A caller
 * limited to some shops gets no group figure while fewer than three other shops hold data (analytics/peer-groups.ts).
 */
export const groupHiddenSchema = z.string().nullable();

/** A share with its 95 % Wilson interval. For an anonymised peer the counts and the interval are withheld. */
export const shareFigureSchema = z.object({
  value: z.number().nullable(),
  lower: z.number().nullable(),
  upper: z.number().nullable(),
  successes: z.number().nullable(),
  n: z.number().nullable(),
  /** why there is no value, in words ("fewer than 30 lines", "no data yet: …") */
  note: z.string().nullable(),
});
export type ShareFigure = z.infer<typeof shareFigureSchema>;

export const efficiencyFigureSchema = z.object({
  value: z.number().nullable(),
  standardHours: z.number().nullable(),
  actualHours: z.number().nullable(),
  lines: z.number().nullable(),
  note: z.string().nullable(),
});
export type EfficiencyFigure = z.infer<typeof efficiencyFigureSchema>;

export const waitFigureSchema = z.object({
  median: z.number().nullable(),
  p90: z.number().nullable(),
  n: z.number().nullable(),
  note: z.string().nullable(),
});
export type WaitFigure = z.infer<typeof waitFigureSchema>;

export const funnelStatusSchema = z.enum(["above_998", "above_95", "within", "below_95", "below_998", "not_rated"]);
export type FunnelStatus = z.infer<typeof funnelStatusSchema>;

export const comebackFigureSchema = shareFigureSchema.extend({
  funnel: funnelStatusSchema,
  /** the funnel position in words */
  words: z.string(),
  /** the Wilson lower limit is above the group rate (the DOMAIN flag) */
  aboveGroup: z.boolean(),
});
export type ComebackFigure = z.infer<typeof comebackFigureSchema>;

export const technicianRowSchema = z.object({
  techId: z.string(),
  name: z.string(),
  comeback: shareFigureSchema,
  aboveGroup: z.boolean(),
});
export type TechnicianRow = z.infer<typeof technicianRowSchema>;

export const shopBenchmarkSchema = z.object({
  /** row key: the shop code for a named shop, "peer-B" for an anonymised peer */
  key: z.string(),
  label: z.string(),
  peer: z.boolean(),
  shopCode: z.string().nullable(),
  name: z.string().nullable(),
  /** exact for named shops, null for peers; the band is given to everyone */
  lines: z.number().nullable(),
  volumeBand: z.string(),
  comeback: comebackFigureSchema,
  efficiency: efficiencyFigureSchema,
  partsWait: waitFigureSchema,
  backOrder: shareFigureSchema,
  coldStartMeasured: shareFigureSchema,
  warrantyOnTime: shareFigureSchema,
  /** named shops only */
  technicians: z.array(technicianRowSchema).nullable(),
  /** the caller may open the comeback pairs of this shop */
  drillDown: z.boolean(),
});
export type ShopBenchmark = z.infer<typeof shopBenchmarkSchema>;

export const visitSchema = z.object({
  key: z.string(),
  label: z.string(),
  severity: z.enum(["visit", "watch"]),
  reasons: z.array(z.string()),
});
export type Visit = z.infer<typeof visitSchema>;

export const formulasSchema = z.object({
  comebackRate: z.string(),
  labourEfficiency: z.string(),
  partsWait: z.string(),
  backOrderRate: z.string(),
  coldStartMeasured: z.string(),
  warrantyOnTime: z.string(),
  funnel: z.string(),
  anonymity: z.string().nullable(),
});
export type Formulas = z.infer<typeof formulasSchema>;

/**
 * The other shops on one figure, for a caller who may not name them: groups of at least three shops, each given
 * by its count and the rounded cut points around it (server/analytics/peer-groups.ts states the rule).
 */
export const peerGroupSchema = z.object({
  shops: z.number(),
  /** figures at or above this (null: the lowest group) */
  from: z.number().nullable(),
  /** figures below this (null: the highest group) */
  to: z.number().nullable(),
});
export type PeerGroup = z.infer<typeof peerGroupSchema>;

export const peerSpreadSchema = z.object({
  /** other shops with this figure */
  shops: z.number(),
  /** the rounding step of the figures and cut points (0.01 = whole percent) */
  step: z.number(),
  groups: z.array(peerGroupSchema),
  words: z.string(),
});
export type PeerSpread = z.infer<typeof peerSpreadSchema>;

export const peerSummarySchema = z.object({
  /** how many other shops there are */
  shops: z.number(),
  /** the anonymity rule in words */
  rule: z.string(),
  lines: peerSpreadSchema,
  comeback: peerSpreadSchema,
  efficiency: peerSpreadSchema,
  partsWaitMedian: peerSpreadSchema,
  partsWaitP90: peerSpreadSchema,
  backOrder: peerSpreadSchema,
  coldStartMeasured: peerSpreadSchema,
  warrantyOnTime: peerSpreadSchema,
});
export type PeerSummary = z.infer<typeof peerSummarySchema>;

/** GET /api/benchmarks/shops */
export const shopBenchmarksSchema = z.object({
  period: periodSchema,
  settings: settingsSchema,
  viewer: z.object({ groupWide: z.boolean(), ownShops: z.array(z.string()) }),
  formulas: formulasSchema,
  /** null when hidden from this caller (groupHidden says why) */
  group: z
    .object({
      lines: z.number(),
      comeback: shareFigureSchema,
      efficiency: efficiencyFigureSchema,
      partsWait: waitFigureSchema,
      backOrder: shareFigureSchema,
      coldStartMeasured: shareFigureSchema,
      warrantyOnTime: shareFigureSchema,
    })
    .nullable(),
  groupHidden: groupHiddenSchema,
  /** the shops the caller may name (every shop for a group-wide caller) */
  shops: z.array(shopBenchmarkSchema),
  /** the other shops as groups of at least three, figure by figure; null for a group-wide caller */
  peers: peerSummarySchema.nullable(),
  /** the answer to "which shop needs a visit": above the 99.8 % limit → visit, above 95 % or Wilson flag → watch */
  visits: z.array(visitSchema),
});
export type ShopBenchmarks = z.infer<typeof shopBenchmarksSchema>;

/** Funnel limits around the group rate at a range of volumes (none without a group rate). */
export const funnelLimitsSchema = z.array(z.object({ n: z.number(), lower95: z.number(), upper95: z.number(), lower998: z.number(), upper998: z.number() }));
export type FunnelLimits = z.infer<typeof funnelLimitsSchema>;

export const funnelPointSchema = z.object({
  key: z.string(),
  label: z.string(),
  peer: z.boolean(),
  /** exact lines for named shops, null for peers */
  lines: z.number().nullable(),
  volumeBand: z.string(),
  /** where the point sits on the volume axis: exact lines, or the middle of a peer's band */
  x: z.number(),
  /** a peer's volume band as a range on the axis (its line count is withheld); null for a named shop */
  band: z.object({ from: z.number(), to: z.number() }).nullable(),
  rate: z.number(),
  status: funnelStatusSchema,
  words: z.string(),
});
export type FunnelPoint = z.infer<typeof funnelPointSchema>;

/** GET /api/benchmarks/funnel */
export const funnelSchema = z.object({
  period: periodSchema,
  settings: settingsSchema,
  groupRate: z.number().nullable(),
  groupLines: z.number().nullable(),
  groupHidden: groupHiddenSchema,
  limits: funnelLimitsSchema,
  points: z.array(funnelPointSchema),
  /** shops below 30 lines, not plotted */
  notRated: z.array(z.string()),
  method: z.string(),
});
export type Funnel = z.infer<typeof funnelSchema>;

export const trendPointSchema = z.object({
  month: z.string(),
  /** the month's own comeback rate (null below 30 lines or for a peer) */
  monthRate: z.number().nullable(),
  monthLines: z.number().nullable(),
  /** the 12 months ending with this one: enough lines to read a trend */
  rolling: shareFigureSchema,
});
export type TrendPoint = z.infer<typeof trendPointSchema>;

/** GET /api/benchmarks/trend */
export const trendSchema = z.object({
  period: periodSchema,
  settings: settingsSchema,
  months: z.array(z.string()),
  /** empty when hidden from this caller */
  group: z.array(trendPointSchema),
  groupHidden: groupHiddenSchema,
  series: z.array(z.object({ key: z.string(), label: z.string(), peer: z.boolean(), points: z.array(trendPointSchema) })),
  method: z.string(),
});
export type Trend = z.infer<typeof trendSchema>;

export const pairLineSchema = z.object({
  /** null for a line at a shop outside the caller's scope */
  shopCode: z.string().nullable(),
  roNumber: z.string().nullable(),
  lineNo: z.number().nullable(),
  opened: z.string(),
  closed: z.string().nullable(),
  hourMeter: z.number().nullable(),
  component: z.string().nullable(),
  technician: z.string().nullable(),
  complaint: z.string().nullable(),
  cause: z.string().nullable(),
  correction: z.string().nullable(),
});
export type PairLine = z.infer<typeof pairLineSchema>;

/** GET /api/benchmarks/comebacks */
export const comebackPairsSchema = z.object({
  period: periodSchema,
  settings: settingsSchema,
  shop: z.object({ code: z.string(), name: z.string() }),
  technician: z.string().nullable(),
  lines: z.number(),
  withComeback: z.number(),
  rule: z.string(),
  pairs: z.array(
    z.object({
      original: pairLineSchema,
      followUp: pairLineSchema,
      daysAfterClose: z.number(),
      hoursAfterClose: z.number().nullable(),
    }),
  ),
});
export type ComebackPairs = z.infer<typeof comebackPairsSchema>;
