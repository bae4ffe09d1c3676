import { z } from "zod";

/** ISO weekday numbers, 1 = Monday … 7 = Sunday, with their names. */
export const WEEKDAYS = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"] as const;
export const weekdayName = (isoDay: number): string => WEEKDAYS[isoDay - 1] ?? "Monday";

/** PUT /api/digest: the weekly digest on or off and the day it comes. */
export const digestPreferenceSchema = z.object({
  enabled: z.boolean({ error: "Weekly digest on or off should be yes or no" }),
  weekday: z
    .number({ error: "The digest's day should be a weekday from 1 (Monday) to 7 (Sunday)" })
    .int({ error: "The digest's day should be a weekday from 1 (Monday) to 7 (Sunday)" })
    .min(1, { error: "The digest's day should be a weekday from 1 (Monday) to 7 (Sunday)" })
    .max(7, { error: "The digest's day should be a weekday from 1 (Monday) to 7 (Sunday)" }),
});
export type DigestPreference = z.infer<typeof digestPreferenceSchema>;

export const digestLinkSchema = z.object({ label: z.string(), url: z.string() });
export type DigestLink = z.infer<typeof digestLinkSchema>;

/** One part of a digest: a title, its lines in words, and links back to the pages they come from. */
export const digestSectionSchema = z.object({
  key: z.string(),
  title: z.string(),
  lines: z.array(z.string()),
  links: z.array(digestLinkSchema),
});
export type DigestSection = z.infer<typeof digestSectionSchema>;

export const digestSchema = z.object({
  /** ISO week, "2025-W28" */
  week: z.string(),
  /** the week in words, "week 28, 7–13 July 2025" */
  weekLabel: z.string(),
  subject: z.string(),
  /** changes are counted from this time (the last digest sent, else a week before the day) */
  since: z.string(),
  sections: z.array(digestSectionSchema),
});
export type Digest = z.infer<typeof digestSchema>;

/** GET /api/digest: the user's choice, the address it goes to and this week's digest as it would read now. */
export const digestPageSchema = z.object({
  preference: digestPreferenceSchema,
  email: z.string().nullable(),
  /** the last week a digest went to this user, if any */
  lastSent: z.object({ week: z.string(), at: z.string() }).nullable(),
  preview: digestSchema,
});
export type DigestPage = z.infer<typeof digestPageSchema>;

/** What one run of the digest job did. */
export const digestRunSchema = z.object({
  date: z.string(),
  week: z.string(),
  sent: z.number(),
  skipped: z.number(),
  failed: z.number(),
});
export type DigestRun = z.infer<typeof digestRunSchema>;

/** Where the digest lives in the API (the user's own: GET the page, PUT the choice). */
export const digestApiPath = "/api/digest";

/** Said under every digest, in the mail and on the account page. */
export const DIGEST_CAUTION =
  "Findings and benchmarks are statistical signals from the repair records, not repair instructions: before any work on a machine, follow the maker's service manual, local codes and licensed practice, and the usual safety precautions.";
