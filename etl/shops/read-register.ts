import { createReadStream } from "node:fs";
import { parse } from "csv-parse";
import { z } from "zod";
import { EtlFatalError } from "../errors.js";
import { listProfiles } from "../profiles/registry.js";
import type { ShopInput } from "./upsert-shops.js";

/**
 * The shop register: one CSV row per shop, so that a shop's name, place, climate and time zone are known
 * (a load only adds a bare shop, named by its code, for a code it meets first). Layout in docs/exports.md,
 * "shops". Comma-separated, UTF-8 with or without a byte-order mark, a header line naming the columns.
 */
export const registerColumns = ["code", "name", "region", "town", "lat", "lon", "climate_zone", "time_zone", "weather_station", "export_profile"] as const;

/** a column the file lacks, or a blank cell, is null; text is trimmed */
const blankToNull = (v: unknown) => (v === undefined || (typeof v === "string" && v.trim() === "") ? null : typeof v === "string" ? v.trim() : v);
const optionalText = z.preprocess(blankToNull, z.string().max(200).nullable());
const coordinate = (label: string, limit: number) =>
  z.preprocess(
    (v) => (blankToNull(v) === null ? null : Number(String(v).trim())),
    z
      .number({ error: `${label} is not a number` })
      .min(-limit, `${label} must lie between -${limit} and ${limit}`)
      .max(limit, `${label} must lie between -${limit} and ${limit}`)
      .nullable(),
  );

function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** One register row, validated; the code is upper-cased as loads store it. */
export const registerRowSchema = z.object({
  code: z.preprocess(blankToNull, z.string({ error: "code is blank" }).regex(/^[A-Za-z0-9][A-Za-z0-9 _-]{0,15}$/, "code must be 1–16 letters, digits, spaces, - or _")).transform((c) => c.toUpperCase()),
  name: z.preprocess(blankToNull, z.string({ error: "name is blank" }).max(200)),
  region: optionalText,
  town: optionalText,
  lat: coordinate("latitude", 90),
  lon: coordinate("longitude", 180),
  climate_zone: optionalText,
  time_zone: optionalText.refine((tz) => tz === null || isTimeZone(tz), "time zone is not an IANA name such as Europe/Oslo"),
  weather_station: optionalText,
  export_profile: optionalText.refine((p) => p === null || listProfiles().some((x) => x.id === p), "export profile is not one of etl/profiles"),
});

export interface RegisterRead {
  shops: ShopInput[];
  /** one sentence per bad row or column, with its line number; when any, nothing should be written */
  errors: string[];
}

/** Reads and checks a register file; a missing or unreadable file, or a header without code and name, is fatal. */
export async function readShopRegister(path: string): Promise<RegisterRead> {
  const shops: ShopInput[] = [];
  const errors: string[] = [];
  const seen = new Map<string, number>();
  const parser = createReadStream(path).pipe(parse({ bom: true, relax_column_count: true, skip_empty_lines: true, trim: false }));
  let header: string[] | null = null;
  let line = 0;
  try {
    for await (const fields of parser as AsyncIterable<string[]>) {
      line++;
      if (header === null) {
        header = fields.map((h) => h.trim().toLowerCase());
        const unknown = header.filter((h) => !(registerColumns as readonly string[]).includes(h));
        if (!header.includes("code") || !header.includes("name")) {
          throw new EtlFatalError("HEADER_NOT_RECOGNISED", `the header must name at least the columns code and name (it has: ${header.join(", ")})`);
        }
        if (unknown.length) errors.push(`line 1: unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")} (known: ${registerColumns.join(", ")})`);
        continue;
      }
      if (fields.length !== header.length) {
        errors.push(`line ${line}: ${fields.length} fields but the header has ${header.length}`);
        continue;
      }
      const raw = Object.fromEntries(header.map((h, i) => [h, fields[i]]));
      const r = registerRowSchema.safeParse(raw);
      if (!r.success) {
        errors.push(`line ${line}: ${r.error.issues.map((i) => i.message).join("; ")}`);
        continue;
      }
      const s = r.data;
      const first = seen.get(s.code);
      if (first !== undefined) {
        errors.push(`line ${line}: shop ${s.code} is already on line ${first}`);
        continue;
      }
      seen.set(s.code, line);
      shops.push({
        code: s.code, name: s.name, region: s.region, town: s.town, lat: s.lat, lon: s.lon, climateZone: s.climate_zone,
        timeZone: s.time_zone, weatherStation: s.weather_station, exportProfile: s.export_profile,
      });
    }
  } catch (e) {
    if (e instanceof EtlFatalError) throw e;
    throw new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${(e as Error).message}`);
  }
  if (header === null) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${path} is empty`);
  return { shops, errors };
}
