import { z } from "zod";
import { clusterSchema } from "./analytics-clusters.js";
import { isInt64 } from "../int64.js";
import { claimBucketSchema, claimBucketsSchema, claimFilingSchema, claimLineSplitSchema, claimVersionSchema, filingBodySchema, submitCheckSchema } from "./claim-lifecycle.js";

export const claimStatusSchema = z.enum(["draft", "submitted", "accepted", "partly_accepted", "rejected", "credited", "written_off"]);
export type ClaimStatus = z.infer<typeof claimStatusSchema>;
export const claimKindSchema = z.enum(["repair", "campaign"]);
export type ClaimKind = z.infer<typeof claimKindSchema>;
export const sendStatusSchema = z.enum(["sending", "queued", "sent", "failed"]);

export const claimStatusLabels: Record<ClaimStatus, string> = {
  draft: "Draft",
  submitted: "Submitted",
  accepted: "Accepted",
  partly_accepted: "Partly accepted",
  rejected: "Rejected",
  credited: "Credited",
  written_off: "Written off",
};

const temperatureUnit = z.enum(["C", "F"], { error: "unit must be C or F" });
const keyString = z.string().refine(isInt64, "must be a repair line id (digits, within a 64-bit integer)");

/** POST /api/claims */
export const createClaimSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("repair"), repairLineId: keyString, note: z.string().max(2000).optional(), unit: temperatureUnit.optional() }),
  z.object({
    kind: z.literal("campaign"),
    clusterId: z.string().regex(/^[0-9a-f]{16}$/, "must be a cluster id (16 hex digits)"),
    /** the cluster scan's own query parameters (filters, standardise, q), as the Clusters page put them in the link */
    clusterQuery: z.record(z.string(), z.string()).optional(),
    note: z.string().max(2000).optional(),
    /** the unit the claim's packet states temperatures in (the clerk's; default °C) */
    unit: temperatureUnit.optional(),
  }),
]);
export type CreateClaim = z.infer<typeof createClaimSchema>;

/** GET /api/claims/preview?repairLine=… | ?cluster=…&<cluster query> */
export const claimPreviewQuerySchema = z
  .object({
    repairLine: keyString.optional(),
    cluster: z.string().regex(/^[0-9a-f]{16}$/, "must be a cluster id (16 hex digits)").optional(),
    /** the unit of the cautions' temperatures */
    unit: temperatureUnit.default("C"),
  })
  .refine((q) => Boolean(q.repairLine) !== Boolean(q.cluster), { message: "Give either repairLine or cluster, not both and not neither." });

/** POST /api/claims/:id/status */
export const statusChangeSchema = z.object({
  to: claimStatusSchema,
  reason: z.string().trim().max(2000).optional(),
  amount: z.coerce.number().positive("must be greater than zero").max(10_000_000).optional(),
  /** submitting after the deadline: the clerk saw the days overdue and files anyway */
  confirmLate: z.boolean().optional(),
  /** submitting a claim that went out another way than the packet e-mailed from here */
  filing: filingBodySchema.optional(),
});
export type StatusChangeBody = z.infer<typeof statusChangeSchema>;

const check = z.object({ inside: z.boolean().nullable(), text: z.string() });
export const eligibilitySchema = z.object({
  verdict: z.enum(["covered", "not_covered", "unknown"]),
  coverageClass: z.enum(["base", "engine"]),
  terms: z.object({ months: z.number(), hours: z.number() }),
  coverEnds: z.string().nullable(),
  monthsCheck: check,
  hoursCheck: check,
  endedBy: z.enum(["months", "hours", "both"]).nullable(),
  summary: z.string(),
  termsFromRegistry: z.boolean(),
  /** where the months and hours come from, in words: the machine registry or the policy version (migration 0063) */
  termsSource: z.string(),
});
export type EligibilityView = z.infer<typeof eligibilitySchema>;

export const deadlineSchema = z.object({
  deadline: z.string(),
  daysLeft: z.number(),
  state: z.enum(["open", "due_today", "overdue"]),
  text: z.string(),
});

const verdict = z.enum(["good", "watch", "fault"]);
export const interpretationSchema = z.object({
  compression: z
    .object({
      // `source`: where the verdict's threshold comes from, in words for the maker (shared/threshold-source.ts)
      cylinders: z.array(z.object({ position: z.number(), attempts: z.array(z.number()), mean: z.number(), verdict, band: z.string(), source: z.string() })),
      average: z.number(),
      lowest: z.object({ position: z.number(), mean: z.number(), verdict, band: z.string(), source: z.string() }),
      highest: z.object({ position: z.number(), mean: z.number() }),
      spread: z.number(),
      spreadVerdict: verdict,
      spreadBand: z.string(),
      spreadSource: z.string(),
      pattern: z.object({ kind: z.string(), meaning: z.string(), provenance: z.string(), source: z.string() }),
    })
    .nullable(),
  plugs: z.array(z.object({ position: z.number(), ohms: z.number().nullable(), raw: z.string(), verdict: z.string(), label: z.string(), provenance: z.string(), source: z.string() })),
  rail: z.array(z.object({ volts: z.number(), raw: z.string(), verdict, label: z.string(), provenance: z.string(), source: z.string() })),
  battery: z.array(z.object({ volts: z.number(), raw: z.string() })),
});
export type Interpretation = z.infer<typeof interpretationSchema>;

export const repairLineEvidenceSchema = z.object({
  id: z.string(),
  shopCode: z.string(),
  roNumber: z.string(),
  lineNo: z.number(),
  openedDate: z.string(),
  closedDate: z.string().nullable(),
  hourMeter: z.number().nullable(),
  complaint: z.string().nullable(),
  cause: z.string().nullable(),
  correction: z.string().nullable(),
  laborOp: z.string().nullable(),
  standardHours: z.number().nullable(),
  laborHours: z.number().nullable(),
  partsCost: z.number().nullable(),
  laborCost: z.number().nullable(),
  payType: z.string(),
  partNumber: z.string().nullable(),
  partDescription: z.string().nullable(),
  partQty: z.number().nullable(),
  supplierLot: z.string().nullable(),
  component: z.object({ code: z.string(), name: z.string(), system: z.string(), assembly: z.string() }),
  machine: z.object({
    serial: z.string(),
    modelCode: z.string(),
    modelLine: z.string(),
    engineFamily: z.string(),
    engineSerial: z.string().nullable(),
    buildDate: z.string().nullable(),
    deliveryDate: z.string().nullable(),
    heaterPlugLot: z.string().nullable(),
  }),
  faultCodes: z.array(z.object({ spn: z.number(), fmi: z.number(), meaning: z.string().nullable(), occurrences: z.number() })),
  measurements: z.array(
    z.object({ kind: z.string(), position: z.number(), attempt: z.number(), value: z.number().nullable(), unit: z.string(), overRange: z.boolean(), rawValue: z.string(), rawUnit: z.string().nullable() }),
  ),
  interpretation: interpretationSchema,
  eligibility: eligibilitySchema,
  deadline: deadlineSchema.nullable(),
  /** hour-meter readings around the failure (repair claims only; null on campaign lines) */
  hourTrail: z
    .array(z.object({ date: z.string(), hours: z.number(), source: z.string(), valid: z.boolean(), invalidReason: z.string().nullable(), meterGeneration: z.number(), thisRepair: z.boolean() }))
    .nullable(),
  /** why the hours at failure may not hold up (the RO's reading flagged by the hour-meter cleaning), or null */
  hoursAtRisk: z.string().nullable(),
});
export type RepairLineEvidence = z.infer<typeof repairLineEvidenceSchema>;

export const clusterSnapshotSchema = z.object({
  cluster: clusterSchema,
  components: z.array(z.string()),
  method: z.string(),
  caution: z.string(),
  query: z.record(z.string(), z.string()),
  takenAt: z.string(),
});
export type ClusterSnapshot = z.infer<typeof clusterSnapshotSchema>;

export const eligibilityCountsSchema = z.object({ covered: z.number(), notCovered: z.number(), unknown: z.number() });

export const sendSchema = z.object({
  id: z.string(),
  toAddress: z.string(),
  status: sendStatusSchema,
  attempts: z.number(),
  lastError: z.string().nullable(),
  requestedBy: z.string(),
  requestedAt: z.string(),
  sentAt: z.string().nullable(),
});
export type ClaimSend = z.infer<typeof sendSchema>;

export const claimSummarySchema = z.object({
  id: z.string(),
  claimNumber: z.string(),
  kind: claimKindSchema,
  status: claimStatusSchema,
  title: z.string(),
  shopCode: z.string().nullable(),
  engineFamily: z.string(),
  closedDate: z.string(),
  deadline: deadlineSchema,
  lineCount: z.number(),
  amountClaimed: z.number().nullable(),
  amountCredited: z.number().nullable(),
  lastSend: sendSchema.nullable(),
  createdAt: z.string(),
  createdBy: z.string(),
  /** the version of the claim (1 for the first filing) and the version that corrected it, if any */
  revision: z.number(),
  supersededBy: z.string().nullable(),
  amountPaid: z.number().nullable(),
  filing: claimFilingSchema.nullable(),
  bucket: claimBucketSchema,
});
export type ClaimSummary = z.infer<typeof claimSummarySchema>;

/** GET /api/claims */
export const claimListSchema = z.object({ today: z.string(), claims: z.array(claimSummarySchema), buckets: claimBucketsSchema });

export const auditEntrySchema = z.object({ id: z.string(), at: z.string(), actorName: z.string(), action: z.string(), changes: z.record(z.string(), z.unknown()), text: z.string() });

export const attachmentSchema = z.object({
  id: z.string(),
  originalName: z.string(),
  contentType: z.string(),
  extension: z.string(),
  sizeBytes: z.number(),
  isImage: z.boolean(),
  uploadedBy: z.string(),
  uploadedAt: z.string(),
});
export type Attachment = z.infer<typeof attachmentSchema>;

/** GET /api/claims/:id */
export const claimDetailSchema = claimSummarySchema.extend({
  reason: z.string().nullable(),
  note: z.string().nullable(),
  warrantyEmail: z.string(),
  claimDays: z.number(),
  allowedMoves: z.array(claimStatusSchema),
  lines: z.array(repairLineEvidenceSchema),
  eligibilityCounts: eligibilityCountsSchema,
  cluster: clusterSnapshotSchema.nullable(),
  audit: z.array(auditEntrySchema),
  attachments: z.array(attachmentSchema),
  sends: z.array(sendSchema),
  /** the unit the packet states temperatures in (set when the claim was made), and the cautions in it */
  temperatureUnit: temperatureUnit,
  cautions: z.array(z.string()),
  storageAvailable: z.boolean(),
  sendAvailable: z.boolean(),
  /** the lines in the amount claimed and the lines listed apart, with why */
  split: claimLineSplitSchema,
  correction: z.string().nullable(),
  writtenOffReason: z.string().nullable(),
  versions: z.array(claimVersionSchema),
  /** a draft's submission as it stands today; null once filed */
  submitCheck: submitCheckSchema.nullable(),
  canResubmit: z.boolean(),
  /** the warranty policy version the claim was judged under (migration 0063), with "judged under policy version N of …" */
  policy: z.object({ engineFamily: z.string(), version: z.number(), text: z.string() }),
});
export type ClaimDetail = z.infer<typeof claimDetailSchema>;

/** GET /api/claims/preview */
export const claimPreviewSchema = z.object({
  kind: claimKindSchema,
  title: z.string(),
  lines: z.array(repairLineEvidenceSchema),
  eligibilityCounts: eligibilityCountsSchema,
  deadline: deadlineSchema.nullable(),
  amountClaimed: z.number().nullable(),
  split: claimLineSplitSchema,
  cluster: clusterSnapshotSchema.nullable(),
  existingClaims: z.array(z.object({ id: z.string(), claimNumber: z.string(), kind: claimKindSchema, status: claimStatusSchema })),
  problems: z.array(z.string()),
  cautions: z.array(z.string()),
});
export type ClaimPreview = z.infer<typeof claimPreviewSchema>;

/** GET /api/claims/candidates */
export const claimCandidateSchema = z.object({
  repairLineId: z.string(),
  shopCode: z.string(),
  roNumber: z.string(),
  lineNo: z.number(),
  closedDate: z.string(),
  serial: z.string(),
  modelLine: z.string(),
  component: z.string(),
  hourMeter: z.number().nullable(),
  payType: z.string(),
  amount: z.number().nullable(),
  deadline: deadlineSchema,
  eligibility: z.string(),
});
export type ClaimCandidate = z.infer<typeof claimCandidateSchema>;
export const claimCandidateListSchema = z.object({ candidates: z.array(claimCandidateSchema) });

export const CANDIDATE_PAGE_SIZES = [10, 25, 50, 100] as const;
export const candidateSortKeys = ["deadline", "closed", "serial", "shop", "component", "amount"] as const;

/** GET /api/claims/candidates: one page of the clerk's queue of covered, unclaimed lines. */
export const claimCandidateQuerySchema = z.object({
  page: z.coerce.number({ error: "page must be a whole number from 1" }).int({ error: "page must be a whole number from 1" }).min(1, { error: "page must be a whole number from 1" }).max(100_000).default(1),
  pageSize: z.coerce
    .number()
    .refine((n) => (CANDIDATE_PAGE_SIZES as readonly number[]).includes(n), { error: `rows per page must be one of ${CANDIDATE_PAGE_SIZES.join(", ")}` })
    .default(25),
  sort: z.enum(candidateSortKeys, { error: `sort by one of: ${candidateSortKeys.join(", ")}` }).default("deadline"),
  dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc" }).default("asc"),
  shop: z.string().trim().regex(/^[A-Za-z0-9-]{1,16}$/, { error: "a shop is a code like S1" }).optional().or(z.literal("").transform(() => undefined)),
  component: z.string().trim().max(40, { error: "a component code is at most 40 characters" }).optional().or(z.literal("").transform(() => undefined)),
  engineFamily: z.string().trim().max(32, { error: "an engine family is at most 32 characters" }).optional().or(z.literal("").transform(() => undefined)),
  /** at most this many days left to file (0: due today or overdue; negative: overdue by at least that many) */
  daysLeft: z.coerce.number({ error: "days left must be a whole number" }).int({ error: "days left must be a whole number" }).min(-3650).max(3650).optional(),
  /** a serial or repair-order number, or its beginning */
  q: z.string().trim().max(60, { error: "search for a serial or repair-order number of at most 60 characters" }).optional().or(z.literal("").transform(() => undefined)),
});
export type ClaimCandidateQuery = z.infer<typeof claimCandidateQuerySchema>;

export const claimCandidatePageSchema = z.object({
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
  rows: z.array(claimCandidateSchema.extend({ engineFamily: z.string(), verdict: z.enum(["covered", "not_covered", "unknown"]) })),
  /** lines the search names that are not in the queue, with why in words (a claim holds it, open, outside cover) */
  elsewhere: z.array(z.object({ repairLineId: z.string(), roNumber: z.string(), lineNo: z.number(), serial: z.string(), shopCode: z.string(), component: z.string(), why: z.string() })),
});
export type ClaimCandidatePage = z.infer<typeof claimCandidatePageSchema>;

/** GET /api/admin/mail */
export const capturedMailListSchema = z.object({
  mail: z.array(
    z.object({
      id: z.string(),
      from: z.string(),
      to: z.array(z.string()),
      subject: z.string(),
      receivedAt: z.string(),
      text: z.string(),
      attachments: z.array(z.object({ filename: z.string(), contentType: z.string(), sizeBytes: z.number() })),
    }),
  ),
});
export type CapturedMailList = z.infer<typeof capturedMailListSchema>;
