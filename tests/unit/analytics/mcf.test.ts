import { describe, expect, it } from "vitest";
import {
  mcfAt,
  mcfDifference,
  mcfSlope,
  meanCumulativeFunction,
  type RecurrentUnit,
} from "../../../server/analytics/mcf.js";
import { twoSidedZ } from "../../../server/analytics/distributions.js";
import { valveSeats } from "./fixtures/reference-datasets.js";

const engines: RecurrentUnit[] = valveSeats.map((e) => ({ id: e.id, eventAges: e.replacements, endAge: e.end }));

// REFERENCE case I: Nelson (1995), Technometrics 37:147–157, valve seats on 41 diesel engines (data as in the
// SAS/QC VALVE data set and R survival::valveSeat). All values are a library cross-check (R survival survfit
// cumhaz/std.chaz and an independent numpy loop), per REFERENCE.md; Nelson's printed SE column was not available.
const table: [age: number, r: number, d: number, mcf: number, seLn: number, sePoisson: number][] = [
  [61, 41, 1, 0.02439, 0.024091, 0.02439],
  [139, 41, 2, 0.219512, 0.07327, 0.073171],
  [298, 41, 1, 0.463415, 0.109607, 0.106315],
  [377, 41, 1, 0.658537, 0.131842, 0.126735],
  [404, 40, 1, 0.683537, 0.135939, 0.129178],
  [573, 40, 1, 0.958537, 0.168958, 0.153499],
  [604, 22, 1, 1.059719, 0.185061, 0.16488],
  [646, 13, 1, 1.320465, 0.228505, 0.210655],
  [653, 9, 2, 1.542688, 0.311656, 0.262806],
];

describe("meanCumulativeFunction(units)", () => {
  const curve = meanCumulativeFunction(engines);
  const byAge = new Map(curve.steps.map((s) => [s.age, s]));

  it("counts 48 replacements on 41 engines at 46 distinct ages (REFERENCE case I)", () => {
    expect(curve.units).toBe(41);
    expect(curve.events).toBe(48);
    expect(curve.steps).toHaveLength(46);
  });

  it.each(table)("at %i days has r = %i, d = %i and MCF %f to 1e-6 (library cross-check (R survival / numpy), per REFERENCE.md case I)", (age, r, d, mcf) => {
    const step = byAge.get(age)!;
    expect([step.atRisk, step.events]).toEqual([r, d]);
    expect(Math.abs(step.mcf - mcf)).toBeLessThanOrEqual(1e-6);
  });

  it("gives the Lawless–Nadeau robust SE, e.g. 0.311656 at 653 days (library cross-check (R survival std.chaz), per REFERENCE.md case I)", () => {
    for (const [age, , , , seLn] of table) expect(Math.abs(byAge.get(age)!.stdErrorLawlessNadeau - seLn)).toBeLessThanOrEqual(1e-6);
  });

  it("gives the Poisson-process SE √Σ d/r², e.g. 0.262806 at 653 days (library cross-check (numpy), per REFERENCE.md case I)", () => {
    for (const [age, , , , , sePoisson] of table) expect(Math.abs(byAge.get(age)!.stdErrorPoisson - sePoisson)).toBeLessThanOrEqual(1e-6);
  });

  it("stays at 1.542688 after 653 days up to the last end age 761 (REFERENCE case I)", () => {
    expect(curve.lastAge).toBe(761);
    expect(Math.abs(mcfAt(curve, 760).mcf - 1.542688)).toBeLessThanOrEqual(1e-6);
  });

  it("forms the plain interval M ± z·se and the log interval M·exp(±z·se/M) from the chosen SE (Nelson 1995 normal limits; log form common practice, no source)", () => {
    const z = twoSidedZ(0.95);
    const last = curve.steps.at(-1)!;
    expect(last.lower).toBeCloseTo(last.mcf - z * last.stdError, 12);
    const logged = meanCumulativeFunction(engines, { confidenceType: "log", variance: "poisson" }).steps.at(-1)!;
    expect(logged.stdError).toBe(logged.stdErrorPoisson);
    expect(logged.upper).toBeCloseTo(logged.mcf * Math.exp((z * logged.stdError) / logged.mcf), 12);
  });

  it("rejects a repair dated after the unit's end of history (common practice, no source)", () => {
    expect(() => meanCumulativeFunction([{ id: "x", eventAges: [12], endAge: 10 }])).toThrow(RangeError);
  });
});

describe("meanCumulativeFunction(units) with delayed entry", () => {
  it("counts a unit only after its start age and until its end age, in the MCF and the robust variance (DOMAIN.md: n(t) = machines under observation; Lawless–Nadeau formula of REFERENCE case I; arithmetic written out)", () => {
    // A: observed 0–30, repairs at 5 and 20. B: observed 10–30, none. C: observed 0–8, none.
    // At 5: at risk A, C; d = 1 → M = 0.5; terms A +(1 − 0.5)/2 = 0.25, C −0.5/2 = −0.25.
    // At 20: at risk A, B (C ended); d = 1 → M = 1.0; terms A +0.25, B −0.25.
    // Var = S_A² + S_B² + S_C² = 0.5² + 0.25² + 0.25² = 0.375; Poisson Var = 1/4 + 1/4 = 0.5.
    const curve = meanCumulativeFunction([
      { id: "A", eventAges: [5, 20], endAge: 30 },
      { id: "B", eventAges: [], endAge: 30, startAge: 10 },
      { id: "C", eventAges: [], endAge: 8 },
    ]);
    expect(curve.steps.map((s) => [s.age, s.atRisk, s.mcf])).toEqual([
      [5, 2, 0.5],
      [20, 2, 1],
    ]);
    expect(curve.steps[1].stdErrorLawlessNadeau).toBeCloseTo(Math.sqrt(0.375), 14);
    expect(curve.steps[1].stdErrorPoisson).toBeCloseTo(Math.sqrt(0.5), 14);
  });
});

describe("mcfSlope(curve, fromAge, toAge, per)", () => {
  const curve = meanCumulativeFunction(engines);

  it("is the secant 1000 × (M(653) − M(0)) / 653 per 1,000 days over the valve-seat history (REFERENCE case I values; arithmetic written out)", () => {
    expect(mcfSlope(curve, 0, 653)!).toBeCloseTo((1000 * 1.542688) / 653, 5);
  });

  it("returns null beyond the last observed age (common practice, no source)", () => {
    expect(mcfSlope(curve, 0, 800)).toBeNull();
  });
});

describe("mcfDifference(a, b, ages)", () => {
  it("gives 0 with se √2·se when a curve is compared with itself (independent-samples variance; common practice, no source)", () => {
    const curve = meanCumulativeFunction(engines);
    const [point] = mcfDifference(curve, curve, [653]);
    expect(point.difference).toBe(0);
    expect(point.stdError).toBeCloseTo(Math.SQRT2 * 0.311656, 6);
  });
});
