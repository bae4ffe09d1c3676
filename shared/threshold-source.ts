/**
 * Where a reading's threshold comes from, in the words a maker's service engineer reads in a claim packet.
 * Inside Ironledger every band carries its provenance tag (shared/measurement-interpretation.ts): a trade rule
 * of thumb or a recalled value. Neither tag is fit for the maker: both are generic bands, so both read as
 * "general service practice". A band taken from the maker's own service manual names the shop that entered it,
 * so the maker can check the figure against the manual.
 *
 * Ironledger holds no store of maker-entered values yet: every reading is worded as general service practice
 * until one exists, and `makerManual` is how such a store will name its source.
 */
import type { Provenance } from "./measurement-interpretation.js";

export type ThresholdSource =
  | { kind: "general"; provenance: Provenance }
  | { kind: "maker-manual"; enteredBy: string };

export const GENERAL_PRACTICE = "general service practice";

/** The source of a threshold in words: "the maker's service manual (entered by shop X)" or "general service practice". */
export function thresholdSourceWords(s: ThresholdSource): string {
  if (s.kind === "maker-manual") {
    const who = s.enteredBy.trim();
    return who ? `the maker's service manual (entered by shop ${who})` : "the maker's service manual";
  }
  return GENERAL_PRACTICE;
}

/** A band of Ironledger's own (tagged with its provenance) as a source. */
export const generalSource = (provenance: Provenance): ThresholdSource => ({ kind: "general", provenance });
