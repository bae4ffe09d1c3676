/**
 * Injected bad rows (SCENARIO.md "Injected bad rows"): small pure edits of canonical values, applied on the
 * way out so every fault is counted in the manifest and the ETL can be checked against the counts.
 */
import type { Rng } from "./prng.js";

export const faultKinds = [
  "exactDuplicate", "backwardsHourTypo", "meterReplacement", "futureDate", "closeBeforeOpen", "modelVariant",
  "unknownModel", "blankCause", "serialNotInMaster", "decimalShiftedHours", "negativeLabour",
] as const;
export type FaultKind = (typeof faultKinds)[number];
export type FaultTally = Record<FaultKind, number>;

export function emptyTally(): FaultTally {
  return Object.fromEntries(faultKinds.map((k) => [k, 0])) as FaultTally;
}

export function addTally(into: FaultTally, from: FaultTally): void {
  for (const k of faultKinds) into[k] += from[k];
}

/**
 * A typed reading that went backwards: two adjacent digits of the whole hours transposed so the value drops
 * (2315.4 → 2135.4); when no transposition lowers it, the first digit is dropped (1234.5 → 234.5).
 */
export function backwardsTypo(reading: number): number {
  const whole = Math.floor(reading);
  const frac = Math.round((reading - whole) * 10) / 10;
  const digits = String(whole).split("");
  for (let i = 0; i < digits.length - 1; i++) {
    if (digits[i]! > digits[i + 1]!) {
      [digits[i], digits[i + 1]] = [digits[i + 1]!, digits[i]!];
      return Number(digits.join("")) + frac;
    }
  }
  return Number(digits.slice(1).join("") || "0") + frac;
}

/** A decimal point typed two places early: 4125.0 → 41.25. */
export function decimalShift(reading: number): number {
  return Math.round(reading * 10) / 1000;
}

/** A year typed with its last two digits swapped, or a decade late when swapping does not reach the future. */
export function futureYear(iso: string, after: number): string {
  const year = Number(iso.slice(0, 4));
  const yy = String(year % 100).padStart(2, "0");
  const swapped = 2000 + Number(yy[1]! + yy[0]!);
  return `${swapped > after ? swapped : year + 10}${iso.slice(4)}`;
}

/** A model code as a clerk might type it, still recognisable after trimming and case folding: "skl ", " DLV", "S-KL". */
export function modelVariant(rng: Rng, code: string): string {
  return rng.pick([`${code.toLowerCase()} `, ` ${code}`, `${code.slice(0, 1)}-${code.slice(1)}`, code.toLowerCase()]);
}

/** A model code of no model line at all: a suffixed code ("SKLQ") or an invented code the maker never used ("QZV"). */
export function unknownModel(rng: Rng, code: string): string {
  return rng.pick([`${code}Q`, "QZV", "XJQ", "ZQX", "JVQ", "VQZ"]);
}
