import { z } from "zod";

/** What a claim's filing holds of each of its repair lines: in the amount claimed, or listed apart with why. */
export const claimLineSplitSchema = z.object({
  /** the lines in the amount claimed: covered, or included deliberately (with the clerk's reason) */
  included: z.array(
    z.object({
      lineId: z.string(),
      basis: z.enum(["covered", "included"]),
      /** for a line included deliberately: why it is not covered, and the clerk's reason for claiming it anyway */
      why: z.string().nullable(),
      reason: z.string().nullable(),
      includedBy: z.string().nullable(),
      includedAt: z.string().nullable(),
      amount: z.number().nullable(),
    }),
  ),
  /** lines held by the claim but not claimed: not covered, or coverage cannot be decided */
  apart: z.array(z.object({ lineId: z.string(), why: z.string(), amount: z.number().nullable() })),
  amountClaimed: z.number().nullable(),
  amountApart: z.number().nullable(),
});
export type ClaimLineSplit = z.infer<typeof claimLineSplitSchema>;

/** How a submitted claim went out, and how late. */
export const claimFilingSchema = z.object({
  via: z.enum(["mail", "other", "unrecorded"]),
  reference: z.string().nullable(),
  filedOn: z.string().nullable(),
  daysLate: z.number().nullable(),
});

/** The other versions of the same claim number, oldest first. */
export const claimVersionSchema = z.object({
  id: z.string(),
  revision: z.number(),
  status: z.string(),
  amountClaimed: z.number().nullable(),
  reason: z.string().nullable(),
  correction: z.string().nullable(),
  createdAt: z.string(),
});

/** What a submission would need now: the deadline check and the way out the clerk can use. */
export const submitCheckSchema = z.object({
  daysOverdue: z.number(),
  /** a packet e-mailed from here, when one went */
  sentOn: z.string().nullable(),
  text: z.string(),
});

const isoDate = z.iso.date({ error: "must be a date (YYYY-MM-DD)" });

/** The way a claim went out when it was not e-mailed from here (a portal, a courier): its reference and date. */
export const filingBodySchema = z.object({
  reference: z.string().trim().min(1, "give the reference the portal or carrier gave").max(200),
  filedOn: isoDate,
});

/** POST /api/claims/:id/lines/:lineId/inclusion */
export const lineInclusionSchema = z
  .object({
    include: z.boolean({ error: "include must be true or false" }),
    reason: z.string().trim().max(2000).optional(),
  })
  .refine((b) => !b.include || Boolean(b.reason && b.reason.length >= 5), {
    message: "Including a line that is not covered needs your reason (a few words at least); it goes into the packet and the audit trail.",
    path: ["reason"],
  });
export type LineInclusionBody = z.infer<typeof lineInclusionSchema>;

/** POST /api/claims/:id/resubmit */
export const resubmitSchema = z.object({
  correction: z.string().trim().min(5, "say what was corrected for the maker (a few words at least)").max(2000),
});
export type ResubmitBody = z.infer<typeof resubmitSchema>;

const bucketSchema = z.object({ count: z.number(), amount: z.number() });
/** The claims queue by urgency: to file, waiting for the maker, rejected and open for resubmission. */
export const claimBucketsSchema = z.object({ toFile: bucketSchema, waiting: bucketSchema, rejected: bucketSchema, closed: bucketSchema });
export type ClaimBuckets = z.infer<typeof claimBucketsSchema>;
export const claimBucketSchema = z.enum(["toFile", "waiting", "rejected", "closed"]);
export type ClaimBucket = z.infer<typeof claimBucketSchema>;

const moneyRow = z.object({ key: z.string(), claims: z.number(), claimed: z.number(), paid: z.number(), writtenOff: z.number(), open: z.number() });
export type MoneyRow = z.infer<typeof moneyRow>;
/** GET /api/claims/money */
export const claimMoneySchema = z.object({
  basis: z.string(),
  byMonth: z.array(moneyRow),
  byEngineFamily: z.array(moneyRow),
  total: moneyRow,
});
export type ClaimMoney = z.infer<typeof claimMoneySchema>;
