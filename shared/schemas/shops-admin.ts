import { z } from "zod";

/**
 * The shop register's rules, in one place: the CLI's register file (etl/shops/read-register.ts), the admin
 * API (server/routes/admin-shops.ts) and the admin form (src/features/admin/shops) all check a shop with
 * `shopEntrySchema`. Layout and meaning of each field: docs/exports.md, "shops".
 */

/** 1–16 letters, digits, spaces, - or _, starting with a letter or digit; stored upper-case. */
export const shopCodePattern = /^[A-Za-z0-9][A-Za-z0-9 _-]{0,15}$/;

/** The longest text a register field holds. */
export const SHOP_TEXT_MAX = 200;

/** True for a time zone the runtime's IANA database knows (Europe/Oslo, America/Chicago, UTC). */
export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** an absent value, null or blank text is null; text is trimmed */
const blankToNull = (v: unknown) => (v === undefined || v === null || (typeof v === "string" && v.trim() === "") ? null : typeof v === "string" ? v.trim() : v);

const requiredText = (label: string) =>
  z.preprocess(
    blankToNull,
    z
      .string({ error: (i) => (i.input === null ? `${label} is blank` : `${label} must be text`) })
      .max(SHOP_TEXT_MAX, `${label} is longer than ${SHOP_TEXT_MAX} characters`),
  );

const optionalText = (label: string) =>
  z.preprocess(
    blankToNull,
    z.string({ error: `${label} must be text` }).max(SHOP_TEXT_MAX, `${label} is longer than ${SHOP_TEXT_MAX} characters`).nullable(),
  );

const coordinate = (label: string, limit: number) =>
  z.preprocess(
    (v) => (blankToNull(v) === null ? null : typeof v === "number" ? v : typeof v === "string" ? Number(v.trim()) : Number.NaN),
    z
      .number({ error: `${label} is not a number` })
      .min(-limit, `${label} must lie between -${limit} and ${limit}`)
      .max(limit, `${label} must lie between -${limit} and ${limit}`)
      .nullable(),
  );

/** The code field alone: upper-cased as loads store it. */
export const shopCodeSchema = z
  .preprocess(
    blankToNull,
    z.string({ error: (i) => (i.input === null ? "code is blank" : "code must be text") }).regex(shopCodePattern, "code must be 1–16 letters, digits, spaces, - or _"),
  )
  .transform((c) => c.toUpperCase());

/**
 * One shop of the register. `knownProfiles` gives the export profile ids a shop may name (the ETL's
 * profile registry on the server and in the CLI, the list the API answers with in the browser); it is
 * read when a value is checked, not when the schema is made.
 */
export function shopEntrySchema(knownProfiles: () => readonly string[]) {
  return z.object({
    code: shopCodeSchema,
    name: requiredText("name"),
    region: optionalText("region"),
    town: optionalText("town"),
    lat: coordinate("latitude", 90),
    lon: coordinate("longitude", 180),
    climateZone: optionalText("climate zone"),
    timeZone: optionalText("time zone").refine((tz) => tz === null || isTimeZone(tz), "time zone is not an IANA name such as Europe/Oslo"),
    weatherStation: optionalText("weather station"),
    exportProfile: optionalText("export profile").refine((p) => p === null || knownProfiles().includes(p), "export profile is not one of etl/profiles"),
  });
}

/** An edit: every field but the code, which names the shop in every export and never changes. */
export function shopEditSchema(knownProfiles: () => readonly string[]) {
  return shopEntrySchema(knownProfiles).omit({ code: true });
}

export type ShopEntrySchema = ReturnType<typeof shopEntrySchema>;
export type ShopEditSchema = ReturnType<typeof shopEditSchema>;
/** A shop as checked: code upper-case, blanks null, coordinates numbers. */
export type ShopEntry = z.output<ShopEntrySchema>;
export type ShopEdit = z.output<ShopEditSchema>;

/** An export profile a shop may name (etl/profiles/<id>.json) and the kind of export it reads. */
export const exportProfileOptionSchema = z.object({ id: z.string(), kind: z.string() });
export type ExportProfileOption = z.infer<typeof exportProfileOptionSchema>;

/** A registered shop as the admin page lists it, with what the warehouse holds of it. */
export const adminShopSchema = z.object({
  code: z.string(),
  name: z.string(),
  region: z.string().nullable(),
  town: z.string().nullable(),
  lat: z.number().nullable(),
  lon: z.number().nullable(),
  climateZone: z.string().nullable(),
  timeZone: z.string().nullable(),
  weatherStation: z.string().nullable(),
  exportProfile: z.string().nullable(),
  /** machines whose home shop this is */
  machines: z.number().int(),
  /** repair-order lines of this shop */
  repairLines: z.number().int(),
});
export type AdminShop = z.infer<typeof adminShopSchema>;

/** GET /api/admin/shops: every registered shop, and the profiles a shop may name. */
export const adminShopListSchema = z.object({ shops: z.array(adminShopSchema), profiles: z.array(exportProfileOptionSchema) });
export type AdminShopList = z.infer<typeof adminShopListSchema>;
