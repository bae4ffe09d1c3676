import { z } from "zod";
import { isInt64 } from "../int64.js";

/**
 * Imports: export files fed from the browser. An upload is checked (a dry run over the whole file, nothing
 * stored) and shown as a preview; the user may change kind, profile or shop and check again; then loads it
 * as a background job whose progress the page follows. Every load is an ETL batch with its rejects.
 */

export const exportKinds = ["machines", "jobs", "measurements", "weather", "hours"] as const;
export const exportKindSchema = z.enum(exportKinds);
export type ExportKindName = z.infer<typeof exportKindSchema>;

/**
 * checking → ready (preview shown) → queued → loading → loaded; or failed (a message says why), refused (the
 * file cannot be loaded as it is: not CSV, unknown layout, another shop's rows for a manager), cancelled.
 */
export const importStatusSchema = z.enum(["checking", "ready", "refused", "queued", "loading", "loaded", "failed", "cancelled"]);
export type ImportStatus = z.infer<typeof importStatusSchema>;

export const importStatusLabels: Record<ImportStatus, string> = {
  checking: "Checking the file",
  ready: "Ready to load",
  refused: "Cannot be loaded",
  queued: "Waiting to load",
  loading: "Loading",
  loaded: "Loaded",
  failed: "Load failed",
  cancelled: "Cancelled",
};

const cellValue = z.union([z.string(), z.number(), z.boolean(), z.null()]);

export const importPreviewSchema = z.object({
  read: z.number().int(),
  inserted: z.number().int(),
  updated: z.number().int(),
  unchanged: z.number().int(),
  rejected: z.number().int(),
  header: z.object({
    ignored: z.array(z.object({ column: z.string(), position: z.number().int(), reason: z.string() })),
    absent: z.array(z.string()),
    encoding: z.string().nullable(),
  }),
  mergedLines: z.array(z.object({ first: z.number().int(), last: z.number().int() })),
  /** shops the file's rows name, with how many rows each */
  shops: z.array(z.object({ code: z.string(), rows: z.number().int() })),
  /** the order of the columns of `rows` (the warehouse's), when known */
  columns: z.array(z.string()).optional(),
  /** the first rows as they would land: canonical column → value (warehouse units and codes) */
  rows: z.array(z.object({ line: z.number().int(), values: z.record(z.string(), cellValue) })),
  /** the first rejects: line, reason code, reason in words, the raw fields */
  rejects: z.array(z.object({ line: z.number().int(), code: z.string(), reason: z.string(), raw: z.array(z.string()) })),
});
export type ImportPreview = z.infer<typeof importPreviewSchema>;

export const importProgressSchema = z.object({
  rowsRead: z.number().int(),
  bytesRead: z.number(),
  totalBytes: z.number(),
  rowsPerSecond: z.number(),
  percent: z.number(),
  secondsLeft: z.number().nullable(),
  phase: z.enum(["reading", "merging", "refreshing", "done"]),
});
export type ImportProgress = z.infer<typeof importProgressSchema>;

export const importSchema = z.object({
  id: z.string(),
  fileName: z.string(),
  sizeBytes: z.number(),
  sha256: z.string(),
  uploadedBy: z.string(),
  uploadedAt: z.string(),
  /** chosen by the user, else detected from the header */
  kind: exportKindSchema.nullable(),
  profile: z.string().nullable(),
  shop: z.string().nullable(),
  status: importStatusSchema,
  /** why it was refused or failed, in words */
  message: z.string().nullable(),
  preview: importPreviewSchema.nullable(),
  progress: importProgressSchema.nullable(),
  /** the ETL batch of the load, once loaded */
  batchId: z.string().nullable(),
});
export type Import = z.infer<typeof importSchema>;

/** POST /api/imports (multipart, field "files", one or more) */
export const uploadResultSchema = z.object({ imports: z.array(importSchema) });

/** POST /api/imports/:id/check: check again with other choices (blank = detect) */
export const importChoicesSchema = z.object({
  kind: exportKindSchema.nullable().optional(),
  profile: z.string().max(100).nullable().optional(),
  shop: z.string().max(16).nullable().optional(),
});
export type ImportChoices = z.infer<typeof importChoicesSchema>;

/** GET /api/imports */
export const importListSchema = z.object({ imports: z.array(importSchema) });

/** GET /api/imports/profiles: the profiles a file can be read with, at their latest versions */
export const importProfileListSchema = z.object({ profiles: z.array(z.object({ id: z.string(), kind: exportKindSchema, version: z.number().int() })) });
export type ImportProfileList = z.infer<typeof importProfileListSchema>;

/**
 * Whether the dashboards show a batch yet: "current" (with when they became so) once the answers the server
 * keeps warm were computed for data that holds it, "updating" until then.
 */
export const batchDashboardsSchema = z.object({
  state: z.enum(["current", "updating"]),
  asOf: z.string().nullable(),
});
export type BatchDashboards = z.infer<typeof batchDashboardsSchema>;

export const batchSchema = z.object({
  id: z.string(),
  fileName: z.string(),
  kind: exportKindSchema,
  profile: z.string(),
  /** the version of the profile the file was read with (null for loads from before profiles were versioned) */
  profileVersion: z.number().int().nullable(),
  shop: z.string().nullable(),
  loadedBy: z.string(),
  startedAt: z.string(),
  durationMs: z.number().nullable(),
  status: z.enum(["running", "loaded", "already_loaded", "failed"]),
  read: z.number().int(),
  inserted: z.number().int(),
  updated: z.number().int(),
  unchanged: z.number().int(),
  rejected: z.number().int(),
  /** the upload it came from, when loaded from the browser (its original file can be downloaded) */
  importId: z.string().nullable(),
  /** whether the dashboards show this batch yet; null or absent when the server cannot say (no answer warm-up runs) */
  dashboards: batchDashboardsSchema.nullable().optional(),
});
export type Batch = z.infer<typeof batchSchema>;

/** GET /api/batches?shop=&limit= */
export const batchListQuerySchema = z.object({
  shop: z.string().max(16).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export const batchListSchema = z.object({ batches: z.array(batchSchema) });

const batchIdString = z.string().refine(isInt64, "must be a batch id");
export const batchIdParamSchema = z.object({ id: batchIdString });

/** GET /api/batches/:id/rejects?reason=&offset=&limit= (and rejects.csv?reason=) */
export const rejectQuerySchema = z.object({
  reason: z.string().max(40).optional(),
  offset: z.coerce.number().int().min(0).default(0),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export const rejectPageSchema = z.object({
  batch: batchSchema,
  total: z.number().int(),
  reasons: z.array(z.object({ code: z.string(), count: z.number().int() })),
  /** the file's header, in order: the columns of `raw` */
  columns: z.array(z.string()),
  rows: z.array(
    z.object({
      line: z.number().int(),
      code: z.string(),
      reason: z.string(),
      raw: z.record(z.string(), z.string()),
      /** the later batch that loaded this row's repair-order line (or reading) after all */
      fixedBy: z.string().nullable(),
    }),
  ),
});
export type RejectPage = z.infer<typeof rejectPageSchema>;
