import { z } from "zod";
import { benchmarkQuerySchema, funnelLimitsSchema, funnelStatusSchema, groupHiddenSchema, periodSchema, settingsSchema, shareFigureSchema } from "./benchmarks.js";

/** The KPIs of the shop table whose lines can be opened (the comeback pairs have their own route). */
export const lineKpiSchema = z.enum(["efficiency", "partsWait", "backOrder", "coldStart", "claims"], {
  error: "kpi must be one of efficiency, partsWait, backOrder, coldStart, claims",
});
export type LineKpi = z.infer<typeof lineKpiSchema>;
export const lineKpiLabels: Record<LineKpi, string> = {
  efficiency: "Labour efficiency",
  partsWait: "Parts wait",
  backOrder: "Back-orders",
  coldStart: "Cold-start jobs measured",
  claims: "Claims on time",
};

/** GET /api/benchmarks/lines and /lines.csv: the lines behind one KPI of one shop, with the page's filters. */
export const benchmarkLinesQuerySchema = benchmarkQuerySchema.extend({
  kpi: lineKpiSchema,
  shop: z.string().min(1).max(20),
  technician: z.string().min(1).max(40).optional(),
});
export type BenchmarkLinesQuery = z.infer<typeof benchmarkLinesQuerySchema>;

/** One line behind a KPI; the fields a KPI does not use are null. */
export const kpiLineSchema = z.object({
  roNumber: z.string(),
  lineNo: z.number().nullable(),
  opened: z.string().nullable(),
  closed: z.string().nullable(),
  technician: z.string().nullable(),
  component: z.string().nullable(),
  laborOp: z.string().nullable(),
  standardHours: z.number().nullable(),
  actualHours: z.number().nullable(),
  /** standard ÷ actual of this line (null when no actual time was booked) */
  efficiency: z.number().nullable(),
  partNumber: z.string().nullable(),
  ordered: z.string().nullable(),
  received: z.string().nullable(),
  waitDays: z.number().nullable(),
  backOrdered: z.boolean().nullable(),
  readings: z.number().nullable(),
  claimNumber: z.string().nullable(),
  deadline: z.string().nullable(),
  filed: z.string().nullable(),
  onTime: z.boolean().nullable(),
  /** the line counts as a success of the KPI (back-ordered, measured, on time); null for the sums */
  counted: z.boolean().nullable(),
});
export type KpiLine = z.infer<typeof kpiLineSchema>;

/** The KPI recomputed from the lines returned: it equals the figure of the shop table. */
export const lineTotalsSchema = z.object({
  lines: z.number(),
  /** efficiency: Σ standard h and Σ actual h and their ratio */
  standardHours: z.number().nullable(),
  actualHours: z.number().nullable(),
  /** waits: median and p90 in days */
  median: z.number().nullable(),
  p90: z.number().nullable(),
  /** shares: counted lines of lines, and the share */
  counted: z.number().nullable(),
  value: z.number().nullable(),
});
export type LineTotals = z.infer<typeof lineTotalsSchema>;

export const benchmarkLinesSchema = z.object({
  kpi: lineKpiSchema,
  period: periodSchema,
  settings: settingsSchema,
  shop: z.object({ code: z.string(), name: z.string() }),
  technician: z.string().nullable(),
  /** which lines, in words, and their order */
  rule: z.string(),
  totals: lineTotalsSchema,
  lines: z.array(kpiLineSchema),
});
export type BenchmarkLines = z.infer<typeof benchmarkLinesSchema>;

/** Wait bands in calendar days from order to receipt: they partition every part line. */
export const WAIT_BANDS = [
  { key: "d0_3", label: "0–3 days", from: 0, to: 3 },
  { key: "d4_7", label: "4–7 days", from: 4, to: 7 },
  { key: "d8_14", label: "8–14 days", from: 8, to: 14 },
  { key: "d15", label: "over 14 days", from: 15, to: null },
] as const;
export const WAIT_THRESHOLDS = [3, 7, 14] as const;

export const waitDistributionSchema = z.object({
  key: z.string(),
  label: z.string(),
  /** part lines with an order and a receipt date */
  n: z.number(),
  /** share of lines in each WAIT_BANDS band, in that order; they add up to 1 */
  bands: z.array(z.object({ key: z.string(), label: z.string(), lines: z.number(), share: z.number() })),
  /** share waiting more than 3, 7 and 14 days, with 95 % Wilson intervals */
  over: z.array(z.object({ days: z.number(), figure: shareFigureSchema })),
  median: z.number().nullable(),
  p90: z.number().nullable(),
});
export type WaitDistribution = z.infer<typeof waitDistributionSchema>;

export const waitMonthSchema = z.object({
  /** month the part was ordered */
  month: z.string(),
  n: z.number(),
  over7: z.number().nullable(),
  over14: z.number().nullable(),
  backOrdered: z.number().nullable(),
  median: z.number().nullable(),
  /** part of a stretch that stands out */
  standout: z.boolean(),
});
export type WaitMonth = z.infer<typeof waitMonthSchema>;

export const waitStretchSchema = z.object({
  from: z.string(),
  to: z.string(),
  label: z.string(),
  lines: z.number(),
  over14: z.number(),
  median: z.number().nullable(),
  backOrdered: z.number(),
  /** the parts that waited longest in the stretch, most lines over 14 days first */
  parts: z.array(z.object({ component: z.string(), engineFamily: z.string().nullable(), lines: z.number(), over14: z.number(), median: z.number().nullable() })),
  words: z.string(),
});
export type WaitStretch = z.infer<typeof waitStretchSchema>;

/** GET /api/benchmarks/waits */
export const waitsSchema = z.object({
  period: periodSchema,
  /** the group (null when hidden from this caller) and the shops the caller may name, over the period */
  group: waitDistributionSchema.nullable(),
  groupHidden: groupHiddenSchema,
  shops: z.array(waitDistributionSchema),
  /** the group by month of order over every month of data (empty when the group is hidden) */
  months: z.array(waitMonthSchema),
  /** the group's share over 14 days across every month of data */
  baselineOver14: z.number().nullable(),
  stretches: z.array(waitStretchSchema),
  method: z.string(),
});
export type Waits = z.infer<typeof waitsSchema>;

/**
 * A distribution-free 95 % interval for a median: the order statistics at ranks k and n − k + 1 and their
 * binomial coverage (server/analytics/benchmark-median-interval.ts); null below six values.
 */
export const medianLimitsSchema = z.object({ from: z.number(), to: z.number(), coverage: z.number() }).nullable();
export type MedianLimits = z.infer<typeof medianLimitsSchema>;

export const cycleFigureSchema = z.object({
  /** repair orders closed in the period */
  orders: z.number(),
  /** calendar days from open to close */
  median: z.number().nullable(),
  medianLimits: medianLimitsSchema,
  p90: z.number().nullable(),
  /** Σ days waiting for parts ÷ Σ cycle days */
  waitingShare: z.number().nullable(),
  ordersWaiting: z.number(),
  /** median cycle of the orders that waited for parts */
  medianWaiting: z.number().nullable(),
  /** days waiting for parts of the orders that waited: median and its interval */
  waitingDaysMedian: z.number().nullable(),
  waitingDaysLimits: medianLimitsSchema,
});
export type CycleFigure = z.infer<typeof cycleFigureSchema>;

export const fixRowSchema = z.object({
  key: z.string(),
  label: z.string(),
  /** complaints → without a return for parts → without a comeback */
  funnel: z.object({ complaints: z.number(), noReturn: z.number(), fixed: z.number() }),
  firstTimeFix: shareFigureSchema,
  status: funnelStatusSchema,
  words: z.string(),
  cycle: cycleFigureSchema,
});
export type FixRow = z.infer<typeof fixRowSchema>;

/** GET /api/benchmarks/fix-cycle */
export const fixCycleSchema = z.object({
  period: periodSchema,
  settings: settingsSchema,
  /** null when hidden from this caller */
  group: fixRowSchema.nullable(),
  groupHidden: groupHiddenSchema,
  /** the group's first-time-fix rate and the funnel limits around it (none when hidden) */
  groupRate: z.number().nullable(),
  limits: funnelLimitsSchema,
  shops: z.array(fixRowSchema.extend({ technicians: z.array(fixRowSchema) })),
  method: z.string(),
});
export type FixCycle = z.infer<typeof fixCycleSchema>;
