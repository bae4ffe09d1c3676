/** Warranty coverage of a failure: the coverage class, the terms, and the months and hours checks. */
import { addMonths, daysBetween } from "../../../shared/dates.js";
import { plural } from "../../../shared/text.js";

export type CoverageClass = "base" | "engine";

export interface CoverageTerms {
  months: number;
  hours: number;
}

/** The coverage a warranty policy version holds, per class. */
export type PolicyCoverage = Record<CoverageClass, CoverageTerms>;

/**
 * The coverage of version 1 of every warranty policy (migrations/0063_version_warranty_policies.ts) and the
 * fallback of a caller that reads no policy (common practice, no source): base machine 24 months / 2,000 h;
 * engine 36 months / 3,000 h. Eligibility reads the current policy version instead.
 */
export const DEFAULT_TERMS: PolicyCoverage = {
  base: { months: 24, hours: 2000 },
  engine: { months: 36, hours: 3000 },
};

export const coverageClassLabels: Record<CoverageClass, string> = {
  base: "base machine",
  engine: "engine",
};

/**
 * The coverage class of a component: everything in the Engine system (heater plugs, the intake grid
 * heater and the preheat relay included) is covered as engine; every other system as base machine.
 */
export function coverageClassFor(component: { system: string }): CoverageClass {
  return component.system === "Engine" ? "engine" : "base";
}

/**
 * The machine's terms for a class: the machine registry's terms take precedence, column by column, over the
 * warranty policy's (the policy version the line is judged under; the version-1 coverage when none is given).
 */
export function termsFor(
  cls: CoverageClass,
  machine: { warrantyBaseMonths: number | null; warrantyBaseHours: number | null; warrantyEngineMonths: number | null; warrantyEngineHours: number | null },
  policy: PolicyCoverage = DEFAULT_TERMS,
): CoverageTerms & { fromRegistry: boolean } {
  const months = cls === "engine" ? machine.warrantyEngineMonths : machine.warrantyBaseMonths;
  const hours = cls === "engine" ? machine.warrantyEngineHours : machine.warrantyBaseHours;
  return {
    months: months ?? policy[cls].months,
    hours: hours ?? policy[cls].hours,
    fromRegistry: months !== null && hours !== null,
  };
}

/** Which warranty policy version judged a claim, in words: "judged under policy version 2 of K18-3G". */
export function judgedUnderWords(p: { version: number; engineFamily: string }): string {
  return `judged under policy version ${p.version} of ${p.engineFamily === "*" ? "the group default policy" : p.engineFamily}`;
}

/** Where a line's coverage terms come from, in words, for the claim page and the packet. */
export function termsSourceWords(fromRegistry: boolean, p: { version: number; engineFamily: string } | null): string {
  if (fromRegistry) return "Terms from the machine registry (they take precedence over the warranty policy).";
  if (!p) return "Terms from the warranty policy.";
  return `Terms from warranty policy version ${p.version} of ${p.engineFamily === "*" ? "the group default policy" : p.engineFamily} (the machine registry has none).`;
}

export interface EligibilityInput {
  coverageClass: CoverageClass;
  terms: CoverageTerms;
  deliveryDate: string | null;
  failureDate: string;
  hoursAtFailure: number | null;
}

export type EligibilityVerdict = "covered" | "not_covered" | "unknown";

export interface Eligibility {
  verdict: EligibilityVerdict;
  coverageClass: CoverageClass;
  terms: CoverageTerms;
  /** last covered day: delivery + months */
  coverEnds: string | null;
  monthsCheck: { inside: boolean | null; text: string };
  hoursCheck: { inside: boolean | null; text: string };
  /** the limit that ended cover (both when both are past), null while covered or unknown */
  endedBy: "months" | "hours" | "both" | null;
  /** one sentence with the outcome */
  summary: string;
}

const h = (x: number) => `${x.toLocaleString("en-US", { maximumFractionDigits: 1 })} h`;

/**
 * Warranty eligibility, "whichever comes first": a failure is covered when it happens no later than the
 * delivery date plus the months limit AND the hour meter at failure is no more than the hours limit, for
 * the coverage class of the failed component. Both sides are shown as arithmetic. Without a delivery
 * date or an hour reading the verdict is unknown (the claim is at risk), never guessed.
 */
export function eligibility(i: EligibilityInput): Eligibility {
  const { months, hours } = i.terms;
  let monthsCheck: Eligibility["monthsCheck"];
  let coverEnds: string | null = null;
  if (!i.deliveryDate) {
    monthsCheck = { inside: null, text: "No delivery date on record, so the months limit cannot be checked." };
  } else {
    coverEnds = addMonths(i.deliveryDate, months);
    const margin = daysBetween(i.failureDate, coverEnds);
    monthsCheck =
      margin >= 0
        ? { inside: true, text: `Delivered ${i.deliveryDate} + ${months} months = cover to ${coverEnds}; failure on ${i.failureDate} is ${margin === 0 ? "on the last covered day" : `${plural(margin, "day")} before that`}: inside.` }
        : { inside: false, text: `Delivered ${i.deliveryDate} + ${months} months = cover to ${coverEnds}; failure on ${i.failureDate} is ${plural(-margin, "day")} after that: outside.` };
  }
  let hoursCheck: Eligibility["hoursCheck"];
  if (i.hoursAtFailure === null) {
    hoursCheck = { inside: null, text: "No hour-meter reading at failure, so the hours limit cannot be checked." };
  } else {
    const left = hours - i.hoursAtFailure;
    hoursCheck =
      left >= 0
        ? { inside: true, text: `Hour meter ${h(i.hoursAtFailure)} at failure; limit ${h(hours)} − ${h(i.hoursAtFailure)} = ${h(left)} to spare: inside.` }
        : { inside: false, text: `Hour meter ${h(i.hoursAtFailure)} at failure; ${h(i.hoursAtFailure)} − limit ${h(hours)} = ${h(-left)} over: outside.` };
  }
  const cls = coverageClassLabels[i.coverageClass];
  const terms = `${cls} cover, ${months} months / ${h(hours)}, whichever comes first`;
  let verdict: EligibilityVerdict;
  let endedBy: Eligibility["endedBy"] = null;
  let summary: string;
  if (monthsCheck.inside === false || hoursCheck.inside === false) {
    verdict = "not_covered";
    endedBy = monthsCheck.inside === false && hoursCheck.inside === false ? "both" : monthsCheck.inside === false ? "months" : "hours";
    const what = endedBy === "both" ? "both limits were passed" : endedBy === "months" ? "the months limit was passed" : "the hours limit was passed";
    summary = `Not covered: ${what} (${terms}).`;
  } else if (monthsCheck.inside === null || hoursCheck.inside === null) {
    verdict = "unknown";
    summary = `Cannot be decided: ${monthsCheck.inside === null ? "the delivery date" : "the hour meter"} is missing (${terms}); the claim is at risk.`;
  } else {
    verdict = "covered";
    summary = `Covered: inside both limits (${terms}).`;
  }
  return { verdict, coverageClass: i.coverageClass, terms: { months, hours }, coverEnds, monthsCheck, hoursCheck, endedBy, summary };
}
