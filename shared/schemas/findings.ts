import { z } from "zod";

/** Where a finding stands in the analysts' work. */
export const findingStatusSchema = z.enum(["new", "investigating", "confirmed", "dismissed"]);
export type FindingStatus = z.infer<typeof findingStatusSchema>;

export const findingStatusLabels: Record<FindingStatus, string> = {
  new: "New",
  investigating: "Investigating",
  confirmed: "Confirmed",
  dismissed: "Dismissed",
};

export const findingTrendSchema = z.enum(["new", "stronger", "weaker", "unchanged"]);

export const findingStateSchema = z.object({
  key: z.string(),
  status: findingStatusSchema,
  owner: z.string().nullable(),
  dismissedReason: z.string().nullable(),
  /** a dismissed finding that has grown since: it is shown again */
  grewSinceDismissed: z.boolean(),
  description: z.string(),
  firstSeenAt: z.string(),
  changedAt: z.string(),
  /** how the last load that moved its figures moved them */
  trend: findingTrendSchema,
  figuresChangedAt: z.string(),
  observed: z.number(),
  previousObserved: z.number().nullable(),
});
export type FindingState = z.infer<typeof findingStateSchema>;

/** GET /api/findings */
export const findingStateListSchema = z.object({ states: z.array(findingStateSchema), canWork: z.boolean() });

export const findingEventSchema = z.object({
  at: z.string(),
  actor: z.string(),
  kind: z.enum(["found", "status", "owner", "note", "figures"]),
  from: z.string().nullable(),
  to: z.string().nullable(),
  note: z.string().nullable(),
});

/** GET /api/findings/:key */
export const findingWorkSchema = z.object({ state: findingStateSchema, events: z.array(findingEventSchema), canWork: z.boolean() });
export type FindingWork = z.infer<typeof findingWorkSchema>;

/** POST /api/findings/:key: any of status (a dismissal needs its reason), owner, note */
export const findingChangeSchema = z
  .object({
    status: findingStatusSchema.optional(),
    owner: z.string().trim().max(120, "an owner's name is at most 120 characters").nullable().optional(),
    note: z.string().trim().max(2000, "a note is at most 2,000 characters").optional(),
    reason: z.string().trim().max(500, "a reason is at most 500 characters").optional(),
  })
  .refine((c) => c.status !== "dismissed" || (c.reason ?? "").length > 0, { message: "say why the finding is dismissed (reason)", path: ["reason"] })
  .refine((c) => c.status !== undefined || c.owner !== undefined || (c.note ?? "").length > 0, { message: "change the status or the owner, or write a note" });
export type FindingChange = z.infer<typeof findingChangeSchema>;
