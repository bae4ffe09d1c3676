import { createReadStream } from "node:fs";
import { parse } from "csv-parse";
import { EtlFatalError } from "../errors.js";
import { listProfiles } from "../profiles/registry.js";
import type { ShopInput } from "./upsert-shops.js";
import { shopEntrySchema } from "../../shared/schemas/shops-admin.js";

/**
 * The shop register: one CSV row per shop, so that a shop's name, place, climate and time zone are known
 * (a load only adds a bare shop, named by its code, for a code it meets first). Layout in docs/exports.md,
 * "shops". Comma-separated, UTF-8 with or without a byte-order mark, a header line naming the columns.
 */
export const registerColumns = ["code", "name", "region", "town", "lat", "lon", "climate_zone", "time_zone", "weather_station", "export_profile"] as const;

/** register column → field of the shared shop schema (a column the file lacks is blank) */
const columnField = {
  code: "code", name: "name", region: "region", town: "town", lat: "lat", lon: "lon", climate_zone: "climateZone",
  time_zone: "timeZone", weather_station: "weatherStation", export_profile: "exportProfile",
} as const satisfies Record<(typeof registerColumns)[number], string>;

/** One register row, validated by the rules the admin page uses too (shared/schemas/shops-admin.ts). */
const registerRowSchema = shopEntrySchema(() => listProfiles().map((p) => p.id));

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
      const raw = Object.fromEntries(header.flatMap((h, i) => (Object.hasOwn(columnField, h) ? [[columnField[h as keyof typeof columnField], fields[i]]] : [])));
      const r = registerRowSchema.safeParse(raw);
      if (!r.success) {
        errors.push(`line ${line}: ${r.error.issues.map((i) => i.message).join("; ")}`);
        continue;
      }
      const shop: ShopInput = r.data;
      const first = seen.get(shop.code);
      if (first !== undefined) {
        errors.push(`line ${line}: shop ${shop.code} is already on line ${first}`);
        continue;
      }
      seen.set(shop.code, line);
      shops.push(shop);
    }
  } catch (e) {
    if (e instanceof EtlFatalError) throw e;
    throw new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${(e as Error).message}`);
  }
  if (header === null) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${path} is empty`);
  return { shops, errors };
}
