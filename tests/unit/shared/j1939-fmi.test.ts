import { describe, expect, it } from "vitest";
import { fmiTable, lookupFmi } from "../../../shared/j1939-fmi.js";

// SAE J1939-73 Appendix A, wording as publicly reproduced (not checked against the licensed text); REFERENCE case K.
const published: [number, string][] = [
  [0, "Data valid but above normal operational range – most severe level"],
  [1, "Data valid but below normal operational range – most severe level"],
  [2, "Data erratic, intermittent or incorrect"],
  [3, "Voltage above normal, or shorted to high source"],
  [4, "Voltage below normal, or shorted to low source"],
  [5, "Current below normal or open circuit"],
  [6, "Current above normal or grounded circuit"],
  [7, "Mechanical system not responding or out of adjustment"],
  [8, "Abnormal frequency or pulse width or period"],
  [9, "Abnormal update rate"],
  [10, "Abnormal rate of change"],
  [11, "Root cause not known"],
  [12, "Bad intelligent device or component"],
  [13, "Out of calibration"],
  [14, "Special instructions"],
  [15, "Data valid but above normal operating range – least severe level"],
  [16, "Data valid but above normal operating range – moderately severe level"],
  [17, "Data valid but below normal operating range – least severe level"],
  [18, "Data valid but below normal operating range – moderately severe level"],
  [19, "Received network data in error"],
  [20, "Data drifted high"],
  [21, "Data drifted low"],
  [31, "Condition exists"],
];

describe("lookupFmi(fmi)", () => {
  it.each(published)("maps FMI %i to its J1939-73 Appendix A description (SAE J1939-73 Appendix A, wording as publicly reproduced, not checked against the licensed text)", (fmi, text) => {
    expect(lookupFmi(fmi)).toMatchObject({ fmi, description: text, reserved: false });
  });

  it("maps FMI 22–30 to Reserved (SAE J1939-73 Appendix A, wording as publicly reproduced)", () => {
    for (let fmi = 22; fmi <= 30; fmi++) {
      expect(lookupFmi(fmi)).toMatchObject({ reserved: true, description: "Reserved for SAE assignment" });
    }
  });

  it("keeps the older FMI 11 wording as a note (REFERENCE case K, 'where the sources differ')", () => {
    expect(lookupFmi(11)?.note).toContain("Failure code not identifiable");
  });

  it("returns null outside the 5-bit range or for a fraction (common practice, no source)", () => {
    expect(lookupFmi(32)).toBeNull();
    expect(lookupFmi(-1)).toBeNull();
    expect(lookupFmi(4.5)).toBeNull();
  });
});

describe("fmiTable", () => {
  it("lists all 32 FMIs in order (SAE J1939-73: FMI is a 5-bit field, 0–31)", () => {
    expect(fmiTable.map((d) => d.fmi)).toEqual(Array.from({ length: 32 }, (_, i) => i));
  });
});
