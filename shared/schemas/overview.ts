import { z } from "zod";
import { rateSchema } from "./analytics-rates.js";
import { clusterSchema } from "./analytics-clusters.js";

const loadSchema = z.object({
  batchId: z.string(),
  fileName: z.string(),
  kind: z.string(),
  status: z.string(),
  finishedAt: z.string().nullable(),
  rowsRead: z.number(),
  rowsInserted: z.number(),
  rowsUpdated: z.number(),
  rowsUnchanged: z.number(),
  rowsRejected: z.number(),
});

const headlineSchema = z.object({
  label: z.string(),
  components: z.array(z.string()),
  thisYear: z.object({ failures: z.number(), engineHours: z.number(), rate: rateSchema.nullable() }),
  lastYear: z.object({ failures: z.number(), engineHours: z.number(), rate: rateSchema.nullable() }),
  /** this year's rate ÷ last year's; null when either is missing */
  change: z.number().nullable(),
});
export type Headline = z.infer<typeof headlineSchema>;

/**
 * Which data an answer (or a part of one) was computed for: the last batch the warehouse held then, and when.
 * `current: false` means the warehouse has changed since (a load or a refresh): the answer shown is the
 * previous one, kept while the new one is computed (stale-while-revalidate); ask again shortly.
 */
export const dataAsOfSchema = z.object({
  batchId: z.string().nullable(),
  computedAt: z.string(),
  current: z.boolean(),
});
export type DataAsOf = z.infer<typeof dataAsOfSchema>;

/** GET /api/overview */
/** New clusters the Overview lists by name; the rest are counted and reached through the Clusters page. */
export const NEW_CLUSTERS_SHOWN = 10;

const overviewFindingSchema = z.object({
  key: z.string(),
  /** the lead cluster of the finding in the current scan, to open it; null when the scan no longer shows it */
  id: z.string().nullable(),
  sentence: z.string(),
  status: z.enum(["new", "investigating", "confirmed", "dismissed"]),
  /** what changed, in words: found, stronger or weaker after a load, its status or owner, a note */
  change: z.string(),
  at: z.string(),
});

export const overviewSchema = z.object({
  /** the data behind the loads, headlines and attention list (the clusters carry their own) */
  asOf: dataAsOfSchema.optional(),
  loads: z.array(
    z.object({
      /** null: files spanning the group (machine master, telematics hours) */
      shopCode: z.string().nullable(),
      shopName: z.string(),
      lastFinishedAt: z.string().nullable(),
      rowsRead: z.number(),
      rowsRejected: z.number(),
      files: z.array(loadSchema),
    }),
  ),
  headlines: z.object({
    /** the twelve months ending with the last complete month, and the twelve before ('YYYY-MM') */
    thisYear: z.object({ from: z.string(), to: z.string() }).nullable(),
    lastYear: z.object({ from: z.string(), to: z.string() }).nullable(),
    rows: z.array(headlineSchema),
    method: z.string(),
    /** which windows are compared and which newer (incomplete) months are left out, in words */
    note: z.string().nullable(),
  }),
  clusters: z.object({
    /** the data behind the cluster scan these counts come from */
    asOf: dataAsOfSchema.optional(),
    firstVisit: z.boolean(),
    previousVisitAt: z.string().nullable(),
    total: z.number(),
    /** how many clusters in the current scan the previous visit did not show (every cluster on a first visit) */
    newCount: z.number(),
    /** the highest-ranked of those new clusters, at most NEW_CLUSTERS_SHOWN */
    newSinceLastVisit: z.array(clusterSchema.omit({ repairLineIds: true })),
  }),
  /** findings new or changed since the caller's last visit and since the last load (group-wide roles; null for the others) */
  findings: z
    .object({
      previousVisitAt: z.string().nullable(),
      lastLoadAt: z.string().nullable(),
      sinceVisit: z.array(overviewFindingSchema),
      sinceLoad: z.array(overviewFindingSchema),
    })
    .nullable()
    .optional(),
  attention: z.object({
    windowEnd: z.string().nullable(),
    definition: z.string(),
    machines: z.array(
      z.object({
        serial: z.string(),
        modelLine: z.string(),
        engineFamily: z.string(),
        homeShop: z.string().nullable(),
        failures: z.number(),
        comebacks: z.number(),
        repeatComponents: z.array(z.string()),
        lastOpened: z.string(),
        lastRepairId: z.string(),
        score: z.number(),
      }),
    ),
  }),
});
export type Overview = z.infer<typeof overviewSchema>;
