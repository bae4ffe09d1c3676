import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { EtlFatalError } from "../errors.js";
import { requiredColumns } from "../sources/row-schemas.js";
import { plainText } from "../transform/values.js";
import { profileSchema, type ExportKind, type Profile } from "./profile-schema.js";

const profileDir = path.dirname(fileURLToPath(import.meta.url));

let cache: Map<string, Profile> | null = null;

/** Every profile in etl/profiles/*.json (the defaults the warehouse's stored versions are seeded from), validated against profileSchema (a broken profile throws). */
export function listProfiles(): Profile[] {
  if (!cache) {
    cache = new Map();
    for (const f of readdirSync(profileDir).filter((n) => n.endsWith(".json")).sort()) {
      const parsed = profileSchema.safeParse(JSON.parse(readFileSync(path.join(profileDir, f), "utf8")));
      if (!parsed.success) throw new Error(`profile ${f} is invalid: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
      if (`${parsed.data.id}.json` !== f) throw new Error(`profile ${f} declares id "${parsed.data.id}"; the file name must match`);
      cache.set(parsed.data.id, parsed.data);
    }
  }
  return [...cache.values()];
}

/** A profile by id among `profiles` (default: the files; a load passes the stored versions, etl/profiles/profile-store.ts). */
export function getProfile(id: string, profiles: Profile[] = listProfiles()): Profile {
  const p = profiles.find((x) => x.id === id);
  if (!p) throw new EtlFatalError("UNKNOWN_PROFILE", `unknown profile "${id}" (known: ${profiles.map((x) => x.id).join(", ")})`);
  return p;
}

/** Header cells compare trimmed, case-insensitive and with invisible characters and odd spaces folded. */
export function headerKey(h: string): string {
  return plainText(h).trim().toLowerCase();
}

/** What a file's header means to a profile, worked out before anything is loaded. */
export interface HeaderReport {
  /** header cells no column of the profile reads, with why (their values are not loaded) */
  ignored: { column: string; position: number; reason: string }[];
  /** the profile's optional columns the file lacks: values already stored for them are left as they are */
  absent: string[];
  /** names that appear more than once (a fatal problem: which copy is meant cannot be known) */
  duplicates: { column: string; positions: number[] }[];
}

/** The header checked against a profile: duplicate names, cells it ignores (and why), optional columns it lacks. */
export function headerReport(profile: Profile, header: string[]): HeaderReport {
  const positions = new Map<string, number[]>();
  header.forEach((h, i) => {
    const k = headerKey(h);
    if (k === "") return;
    positions.set(k, [...(positions.get(k) ?? []), i + 1]);
  });
  const duplicates = [...positions].filter(([, p]) => p.length > 1).map(([, p]) => ({ column: header[p[0] - 1].trim(), positions: p }));
  const read = new Set(Object.values(profile.columns).map(headerKey));
  const ignored: HeaderReport["ignored"] = [];
  header.forEach((h, i) => {
    const k = headerKey(h);
    if (read.has(k)) return;
    const reason =
      h.includes("\ufffd")
        ? "its name has bytes that are not valid in the file's encoding (was the file saved in another encoding?), so it matches no column"
        : k === ""
          ? "the column has no name"
          : /[\u0000-\u001f\u007f]/.test(h)
            ? "its name holds control characters, so it matches no column"
            : `profile ${profile.id} has no column of that name`;
    // a nameless column at the end (a trailing delimiter) is common and carries nothing: not worth a word
    if (k === "" && header.slice(i).every((x) => headerKey(x) === "")) return;
    ignored.push({ column: h, position: i + 1, reason });
  });
  const mapped = mapHeader(profile, header);
  const required = new Set(requiredColumns[profile.kind]);
  const absent = Object.keys(profile.columns).filter((c) => !mapped.has(c) && !required.has(c));
  return { ignored, absent, duplicates };
}

/** canonical column → index in the file's header, for the columns the file has. */
export function mapHeader(profile: Profile, header: string[]): Map<string, number> {
  const index = new Map(header.map((h, i) => [headerKey(h), i]));
  const out = new Map<string, number>();
  for (const [canonical, written] of Object.entries(profile.columns)) {
    const i = index.get(headerKey(written));
    if (i !== undefined) out.set(canonical, i);
  }
  return out;
}

/** The canonical columns a profile needs to find in the header; the shop column may come from the profile or --shop. */
export function missingRequiredColumns(profile: Profile, header: string[], shopGiven: boolean): string[] {
  const mapped = mapHeader(profile, header);
  return requiredColumns[profile.kind].filter((c) => !mapped.has(c) && !(c === "shop_code" && (shopGiven || profile.defaultShop)));
}

/**
 * The profile whose header matches the file: every required column present, the most mapped columns winning.
 * `firstLine` decodes the file's first line in a given profile's encoding and splits it with its delimiter.
 */
export function detectProfile(
  firstLine: (p: Profile) => string[],
  kind: ExportKind | undefined,
  shopGiven: boolean,
  profiles: Profile[] = listProfiles(),
): Profile {
  const scored = profiles
    .filter((p) => !kind || p.kind === kind)
    .map((p) => {
      const header = firstLine(p);
      return { p, missing: missingRequiredColumns(p, header, shopGiven).length, mapped: mapHeader(p, header).size, width: header.length };
    })
    .filter((s) => s.missing === 0 && s.width > 1)
    .sort((a, b) => b.mapped - a.mapped);
  if (scored.length === 0) {
    throw new EtlFatalError("HEADER_NOT_RECOGNISED", `the header does not match any ${kind ? `${kind} ` : ""}profile; name one with --profile`);
  }
  if (scored.length > 1 && scored[0].mapped === scored[1].mapped) {
    throw new EtlFatalError("AMBIGUOUS_PROFILE", `the header matches profiles ${scored[0].p.id} and ${scored[1].p.id} equally; name one with --profile`);
  }
  return scored[0].p;
}
