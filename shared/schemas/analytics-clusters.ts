import { z } from "zod";
import { repairRowSchema } from "./repairs.js";

export const clusterQuerySchema = z.object({
  /** component codes to scan; default: the cold-start aids */
  components: z.preprocess((v) => (v === undefined || v === "" ? undefined : String(v).split(",").filter(Boolean)), z.array(z.string().max(40)).optional()),
  q: z.coerce.number().gt(0).lt(1).default(0.05),
  standardise: z.enum(["hour", "hour+temperature"]).default("hour+temperature"),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type ClusterQuery = z.infer<typeof clusterQuerySchema>;

const monthRange = z.object({ from: z.string(), to: z.string() });
export const clusterDimensionsSchema = z.object({
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

/** GET /api/analytics/clusters */
export const clusterListSchema = z.object({
  components: z.array(z.string()),
  method: z.string(),
  caution: z.string(),
  cellsTested: z.number(),
  qThreshold: z.number(),
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
