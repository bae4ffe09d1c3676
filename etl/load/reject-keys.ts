import type { Profile } from "../profiles/profile-schema.js";
import { mapHeader } from "../profiles/registry.js";
import { normaliseCode } from "../transform/values.js";

/**
 * The natural key of a rejected repair-order line, from its raw fields as stored (keyed by the file's own
 * header): 'repair_line|<shop>|<ro>|<line>' normalised as the loader normalises them, whose wh_key is the
 * line's repair_line_key. Null when the row lacks one of them or the profile is unknown. Used to show a
 * reject as fixed once a later batch loaded its line. `profile`: the version the batch was read with.
 */
export function rejectedLineKey(profile: Profile | null, raw: Record<string, string>, shop: string | null): string | null {
  if (!profile || profile.kind !== "jobs") return null;
  const header = Object.keys(raw);
  const at = mapHeader(profile, header);
  const field = (c: string) => {
    const i = at.get(c);
    return i === undefined ? undefined : raw[header[i]]?.trim();
  };
  const shopCode = field("shop_code") || shop || profile.defaultShop;
  const ro = field("ro_number");
  const line = Number(field("line_no"));
  if (!shopCode || !ro || !Number.isInteger(line) || line < 1) return null;
  return `repair_line|${normaliseCode(shopCode)}|${normaliseCode(ro)}|${line}`;
}
