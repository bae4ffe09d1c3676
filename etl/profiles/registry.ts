import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { EtlFatalError } from "../errors.js";
import { requiredColumns } from "../sources/row-schemas.js";
import { profileSchema, type ExportKind, type Profile } from "./profile-schema.js";

const profileDir = path.dirname(fileURLToPath(import.meta.url));

let cache: Map<string, Profile> | null = null;

/** Every profile in etl/profiles/*.json, validated against profileSchema (a broken profile throws). */
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

export function getProfile(id: string): Profile {
  const p = listProfiles().find((x) => x.id === id);
  if (!p) throw new EtlFatalError("UNKNOWN_PROFILE", `unknown profile "${id}" (known: ${listProfiles().map((x) => x.id).join(", ")})`);
  return p;
}

/** Header cells compare trimmed and case-insensitive. */
export function headerKey(h: string): string {
  return h.replace(/^\uFEFF/, "").trim().toLowerCase();
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
export function detectProfile(firstLine: (p: Profile) => string[], kind: ExportKind | undefined, shopGiven: boolean): Profile {
  const scored = listProfiles()
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
