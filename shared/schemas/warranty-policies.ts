import { z } from "zod";

/** The coverage classes a policy holds terms for; a component's class follows its system (Engine → engine). */
export const coverageClasses = ["base", "engine"] as const;
export type PolicyCoverageClass = (typeof coverageClasses)[number];
export const coverageClassWords: Record<PolicyCoverageClass, string> = { base: "Base machine", engine: "Engine" };

/** '*' is the group default, used for an engine family with no policy of its own. */
export const DEFAULT_FAMILY = "*";
export const engineFamilySchema = z
  .string({ error: "the engine family is required" })
  .trim()
  .regex(/^(\*|[A-Za-z0-9][A-Za-z0-9._-]{0,39})$/, "an engine family is letters, digits, dots and dashes (at most 40), starting with a letter or digit");

export const familyWords = (family: string) => (family === DEFAULT_FAMILY ? "the group default" : family);

/** A whole number in a range, refused in one sentence that names the field and the range. */
const whole = (what: string, min: number, max: number) => {
  const words = `${what} must be a whole number from ${min.toLocaleString("en-US")} to ${max.toLocaleString("en-US")}`;
  return z.number({ error: words }).int(words).min(min, words).max(max, words);
};

const termsSchema = (cls: string) =>
  z.object({
    months: whole(`${cls} cover (months)`, 1, 240),
    hours: whole(`${cls} cover (hours)`, 1, 100_000),
  });

/** What one version of a policy holds. */
export const policyTermsSchema = z.object({
  coverage: z.object({ base: termsSchema("Base machine"), engine: termsSchema("Engine") }),
  claimDays: whole("The filing window (days)", 1, 365),
  partRetentionDays: whole("Part retention (days)", 0, 365),
  warrantyEmail: z
    .string({ error: "the address packets go to is required" })
    .trim()
    .max(254, "an e-mail address is at most 254 characters")
    .pipe(z.email("packets go to an e-mail address, such as claims@maker.example")),
});
export type PolicyTerms = z.infer<typeof policyTermsSchema>;

const note = z
  .string({ error: "say why the policy changes" })
  .trim()
  .min(3, "say why the policy changes (at least 3 characters)")
  .max(300, "the note is at most 300 characters");

/** Saving an edit as the next version: the terms, the version the edit started from, and why. */
export const policySaveSchema = z.object({
  policy: policyTermsSchema,
  basedOn: z.number({ error: "say which version the edit started from" }).int().positive(),
  note,
});
export type PolicySave = z.infer<typeof policySaveSchema>;

/** A policy for an engine family that has none yet (it starts at version 1). */
export const policyCreateSchema = z.object({ engineFamily: engineFamilySchema, policy: policyTermsSchema, note });
export type PolicyCreate = z.infer<typeof policyCreateSchema>;

export const policyVersionInfoSchema = z.object({
  version: z.number().int(),
  savedBy: z.string(),
  savedAt: z.string(),
  note: z.string().nullable(),
  /** claims judged under this version */
  claims: z.number().int(),
});

export const policyListSchema = z.object({
  policies: z.array(
    z.object({
      engineFamily: z.string(),
      /** "the group default" or the family itself */
      familyWords: z.string(),
      current: policyTermsSchema,
      latest: policyVersionInfoSchema,
      versions: z.number().int(),
    }),
  ),
});
export type PolicyList = z.infer<typeof policyListSchema>;

export const policyDetailSchema = z.object({
  engineFamily: z.string(),
  familyWords: z.string(),
  /** the version shown (the latest unless an older one was asked for) */
  version: z.number().int(),
  latestVersion: z.number().int(),
  policy: policyTermsSchema,
  history: z.array(policyVersionInfoSchema.extend({ policy: policyTermsSchema })),
});
export type PolicyDetail = z.infer<typeof policyDetailSchema>;
