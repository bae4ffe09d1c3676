import { z } from "zod";
import { isCurrencyCode } from "../format.js";

/** Used until an administrator sets the group's currency; the admin page asks for it to be set. */
export const FALLBACK_CURRENCY = "USD";

/** The group-wide settings every signed-in user reads (the currency money is shown in). */
export const settingsSchema = z.object({
  currency: z.string(),
  /** false while the currency is the fallback, not set by an administrator */
  currencySet: z.boolean(),
  currencySetAt: z.string().nullable(),
  currencySetBy: z.string().nullable(),
});
export type Settings = z.infer<typeof settingsSchema>;

export const settingsEditSchema = z.object(
  {
    currency: z
      .string({ error: "the currency must be a three-letter ISO 4217 code, such as USD, EUR or GBP" })
      .trim()
      .transform((c) => c.toUpperCase())
      .refine(isCurrencyCode, { error: (i) => `“${String(i.input).slice(0, 20)}” is not an ISO 4217 currency code; write three letters, such as USD, EUR or GBP` }),
  },
  { error: "send the settings as a JSON object with the currency, such as {\"currency\": \"EUR\"}" },
);
export type SettingsEdit = z.infer<typeof settingsEditSchema>;

export const settingEventSchema = z.object({ at: z.string(), actorName: z.string(), sentence: z.string() });
export const adminSettingsSchema = z.object({ settings: settingsSchema, history: z.array(settingEventSchema) });
export type AdminSettings = z.infer<typeof adminSettingsSchema>;
