import { z } from "zod";
import { repairRowSchema } from "./repairs.js";

export const clusterQuerySchema = z.object({
  /** component codes to scan; default: the cold-start aids */
  components: z.preprocess((v) => (v === undefined || v === "" ? undefined : String(v).split(",").filter(Boolean)), z.array(z.string().max(40)).optional()),
  q: z.coerce.number().gt(0).lt(1).default(0.05),
  standardise: z.enum(["hour", "hour+temperature"]).default("hour+temperature"),
  /** part by part (each finding names the part; a lot is charged only with its own part's failures) or the parts together */
  level: z.enum(["component", "system"]).default("component"),
  /** the temperature unit of the bands the scan cuts by (and of the words: titles, sentences, facets); findings keep their keys in either */
  unit: z.enum(["C", "F"]).default("C"),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type ClusterQuery = z.infer<typeof clusterQuerySchema>;

const monthRange = z.object({ from: z.string(), to: z.string() });
export const clusterDimensionsSchema = z.object({
  /** the part a cell counts (part-by-part scans); absent at the system level */
  component: z.string().optional(),
  engineFamily: z.string(),
  build: z.union([z.literal("all"), monthRange]),
  supplierLot: z.string(),
  shop: z.string(),
  temperatureBand: z.string(),
  hourBand: z.string(),
});
export type ClusterDimensions = z.infer<typeof clusterDimensionsSchema>;

export const clusterSchema = z.object({
  id: z.string(),
  rank: z.number(),
  description: z.string(),
  dimensions: clusterDimensionsSchema,
  observed: z.number(),
  expected: z.number(),
  ratio: z.number(),
  lower: z.number(),
  upper: z.number(),
  pValue: z.number(),
  qValue: z.number(),
  repairLineIds: z.array(z.string()),
  absorbed: z.number(),
});
export type Cluster = z.infer<typeof clusterSchema>;

/** One underlying signal: the cluster that leads it and the narrower or overlapping clusters inside it (server/analytics/findings.ts). */
export const findingSchema = z.object({
  /** the lead cluster's id */
  id: z.string(),
  /** the key its state is kept under from load to load (GET /api/findings) */
  key: z.string(),
  rank: z.number(),
  /** the part it counts (a component code), or null at the system level */
  part: z.string().nullable(),
  partName: z.string(),
  /** what, where, how much worse than expected with its interval, and what it is not */
  sentence: z.string(),
  /** a supplier-lot finding's life against the other lots, in words (B10 of Weibull fits); null where there is none */
  life: z.string().nullable(),
  lead: clusterSchema,
  facets: z.array(z.object({ cluster: clusterSchema, kind: z.enum(["narrower", "same-failures"]), words: z.string() })),
  /** significant cells of the scan that support it */
  cells: z.number(),
});
export type Finding = z.infer<typeof findingSchema>;

/** GET /api/analytics/clusters */
export const clusterListSchema = z.object({
  components: z.array(z.string()),
  level: z.enum(["component", "system"]),
  method: z.string(),
  caution: z.string(),
  cellsTested: z.number(),
  qThreshold: z.number(),
  /** the scan's signals grouped, one per underlying signal, ranked by their leads */
  findings: z.array(findingSchema),
  /** every kept signal (the findings' leads and facets), ranked */
  clusters: z.array(clusterSchema),
});
export type ClusterList = z.infer<typeof clusterListSchema>;

const bandCount = z.object({ band: z.string(), inCluster: z.number(), elsewhere: z.number() });

/** GET /api/analytics/clusters/:id (same query parameters as the list, so the scan is the same) */
export const clusterDetailSchema = z.object({
  cluster: clusterSchema,
  components: z.array(z.string()),
  method: z.string(),
  caution: z.string(),
  lines: z.array(repairRowSchema),
  machines: z.array(
    z.object({
      serial: z.string(),
      modelLine: z.string(),
      engineFamily: z.string(),
      homeShop: z.string(),
      buildDate: z.string().nullable(),
      lot: z.string(),
      failures: z.number(),
      firstFailure: z.string(),
      lastFailure: z.string(),
    }),
  ),
  timeline: z.array(z.object({ month: z.string(), failures: z.number() })),
  /** the cluster's failures by band beside the other failures of the components scanned (same filters) */
  temperatureProfile: z.array(bandCount),
  hourProfile: z.array(bandCount),
});
export type ClusterDetail = z.infer<typeof clusterDetailSchema>;
