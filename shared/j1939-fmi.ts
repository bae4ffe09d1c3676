/**
 * SAE J1939-73 Failure Mode Identifiers (FMI 0–31), the second half of an SPN/FMI diagnostic trouble code.
 * Wording as publicly reproduced from SAE J1939-73 Appendix A; not checked against the licensed text, so treat it
 * as display text and never match on it in logic (use the number).
 */
export interface FmiDefinition {
  fmi: number;
  description: string;
  /** FMI 22–30: no meaning assigned. */
  reserved: boolean;
  /** Where public copies or revisions word it differently. */
  note?: string;
}

const RESERVED = "Reserved for SAE assignment";

const assigned: Readonly<Record<number, string>> = {
  0: "Data valid but above normal operational range – most severe level",
  1: "Data valid but below normal operational range – most severe level",
  2: "Data erratic, intermittent or incorrect",
  3: "Voltage above normal, or shorted to high source",
  4: "Voltage below normal, or shorted to low source",
  5: "Current below normal or open circuit",
  6: "Current above normal or grounded circuit",
  7: "Mechanical system not responding or out of adjustment",
  8: "Abnormal frequency or pulse width or period",
  9: "Abnormal update rate",
  10: "Abnormal rate of change",
  11: "Root cause not known",
  12: "Bad intelligent device or component",
  13: "Out of calibration",
  14: "Special instructions",
  15: "Data valid but above normal operating range – least severe level",
  16: "Data valid but above normal operating range – moderately severe level",
  17: "Data valid but below normal operating range – least severe level",
  18: "Data valid but below normal operating range – moderately severe level",
  19: "Received network data in error",
  20: "Data drifted high",
  21: "Data drifted low",
  31: "Condition exists",
};

const notes: Readonly<Record<number, string>> = {
  4: 'One public copy reads "shorted to high source"; the others, and the symmetry with FMI 3, give "low source".',
  11: 'Older revisions: "Failure code not identifiable" / "other failure mode".',
  20: "Older revisions list 20–30 as reserved.",
  21: "Older revisions list 20–30 as reserved.",
};

/** All 32 FMIs in order, 0–31. */
export const fmiTable: readonly FmiDefinition[] = Array.from({ length: 32 }, (_, fmi) => {
  const description = assigned[fmi] ?? RESERVED;
  const definition: FmiDefinition = { fmi, description, reserved: assigned[fmi] === undefined };
  return notes[fmi] ? { ...definition, note: notes[fmi] } : definition;
});

/** The FMI's definition, or null when the value is not an integer 0–31 (an FMI is a 5-bit field). */
export function lookupFmi(fmi: number): FmiDefinition | null {
  return Number.isInteger(fmi) && fmi >= 0 && fmi <= 31 ? fmiTable[fmi] : null;
}
