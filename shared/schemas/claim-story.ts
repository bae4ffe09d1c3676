import { z } from "zod";

const part = (what: string) => z.string().trim().max(4000, { error: `${what} is at most 4,000 characters` });

/** PUT /api/claims/:id/narrative: the story the maker reads, in three parts (any may be left empty while drafting). */
export const narrativeSchema = z.object({
  found: part("What was found"),
  done: part("What was done"),
  why: part("Why it is the maker's"),
});
export type Narrative = z.infer<typeof narrativeSchema>;

/** POST /api/claims/:id/notes */
export const noteBodySchema = z.object({
  text: z.string().trim().min(1, { error: "Write the note first." }).max(2000, { error: "A note is at most 2,000 characters." }),
});

export const claimNoteSchema = z.object({ id: z.string(), at: z.string(), authorName: z.string(), authorRole: z.string(), text: z.string() });
export type ClaimNote = z.infer<typeof claimNoteSchema>;

/** GET /api/claims/:id/story: the narrative, a first draft of it from the repair orders, and the notes. */
export const claimStorySchema = z.object({
  narrative: narrativeSchema,
  /** a first draft from the lines' complaint, cause and correction (and the cluster, for a campaign case) */
  suggestion: narrativeSchema,
  /** whether the narrative can still be changed (before the claim goes to the maker) */
  editable: z.boolean(),
  notes: z.array(claimNoteSchema),
});
export type ClaimStory = z.infer<typeof claimStorySchema>;
