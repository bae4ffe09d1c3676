/**
 * Where a reading's threshold comes from, in the words a maker's service engineer reads in a claim packet.
 * Inside Ironledger every band carries its provenance tag (shared/measurement-interpretation.ts): a trade rule
 * of thumb or a recalled value. Neither tag is fit for the maker: both are generic bands, so both read as
 * "general service practice". A band taken from the maker's own service manual names the shop that entered it,
 * so the maker can check the figure against the manual.
 *
 * An engine family's own figures, typed by an administrator from the maker's manual (shared/schemas/engine-specs.ts),
 * name the manual's place the administrator gave, the family, the version of the figures and who entered them.
 */
import type { Provenance } from "./measurement-interpretation.js";

export type ThresholdSource =
  | { kind: "general"; provenance: Provenance }
  | { kind: "maker-manual"; enteredBy: string; family?: { code: string; version: number; reference: string } };

export const GENERAL_PRACTICE = "general service practice";

/**
 * The source of a threshold in words: "general service practice", "the maker's service manual (entered by shop X)",
 * or for a family's figures "the maker's service manual, engine section, table 3 (K26-4R figures, version 2, entered by A. Admin)".
 */
export function thresholdSourceWords(s: ThresholdSource): string {
  if (s.kind === "maker-manual") {
    const who = s.enteredBy.trim();
    if (s.family) {
      const where = s.family.reference.trim();
      return `the maker's service manual${where ? `, ${where}` : ""} (${s.family.code} figures, version ${s.family.version}${who ? `, entered by ${who}` : ""})`;
    }
    return who ? `the maker's service manual (entered by shop ${who})` : "the maker's service manual";
  }
  return GENERAL_PRACTICE;
}

/** A band of Ironledger's own (tagged with its provenance) as a source. */
export const generalSource = (provenance: Provenance): ThresholdSource => ({ kind: "general", provenance });
