import { describe, expect, it } from "vitest";
import {
  costMeanCumulativeFunction,
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

// Nelson's (1988) artificial repair data with costs, as printed in the SAS/QC PROC RELIABILITY documentation
// ("Recurrence Data from Repairable Systems", table "System Repair Histories for Artificial Data": age in months,
// cost in $100, "+" = end of history). The documentation's worked MCF table could not be retrieved, so the
// expected values below are hand-worked from the data (marked so), and the reduction to the count MCF is checked
// against REFERENCE case I.
const artificial = [
  { id: "1", repairs: [{ age: 19, cost: 2 }, { age: 39, cost: 2 }], endAge: 42 },
  { id: "2", repairs: [{ age: 8, cost: 2 }, { age: 14, cost: 1 }, { age: 26, cost: 1 }], endAge: 33 },
  { id: "3", repairs: [{ age: 18, cost: 3 }], endAge: 29 },
  { id: "4", repairs: [{ age: 2, cost: 1 }, { age: 8, cost: 1 }, { age: 16, cost: 2 }], endAge: 20 },
  { id: "5", repairs: [], endAge: 16 },
  { id: "6", repairs: [{ age: 5, cost: 3 }, { age: 12, cost: 1 }], endAge: 12 },
];

describe("costMeanCumulativeFunction(units)", () => {
  const curve = costMeanCumulativeFunction(artificial);

  it("gives the cost MCF 0.1667, 0.6667, …, 5.5167 ($100 per system) at the 10 repair ages of Nelson's artificial data (data: SAS/QC PROC RELIABILITY documentation, Nelson 1988; values hand-worked: Σ cost/r, e.g. 1/6 at 2 months, + 3/6 at 5, + 3/6 at 8, … + 2/1 at 39)", () => {
    const expected: [number, number, number][] = [
      [2, 6, 1 / 6], [5, 6, 4 / 6], [8, 6, 7 / 6], [12, 6, 8 / 6], [14, 5, 8 / 6 + 1 / 5], [16, 5, 8 / 6 + 3 / 5],
      [18, 4, 8 / 6 + 3 / 5 + 3 / 4], [19, 4, 8 / 6 + 3 / 5 + 5 / 4], [26, 3, 8 / 6 + 3 / 5 + 5 / 4 + 1 / 3], [39, 1, 8 / 6 + 3 / 5 + 5 / 4 + 1 / 3 + 2],
    ];
    expect(curve.steps.map((s) => s.age)).toEqual(expected.map((e) => e[0]));
    curve.steps.forEach((s, i) => {
      expect(s.atRisk).toBe(expected[i][1]);
      expect(s.mcf).toBeCloseTo(expected[i][2], 12);
    });
    expect(curve.steps.at(-1)!.mcf).toBeCloseTo(5.516667, 6);
    expect(curve.totalCost).toBe(19);
    expect(curve.repairs).toBe(11);
  });

  it("gives robust variance 30/1296 and 264/1296 and naive variance 30/1296 and 300/1296 at 2 and 5 months (hand-worked from the formulas of Nelson 1995 / Lawless–Nadeau and the naive form, written out in the comment)", () => {
    // At 2 (r = 6, costs 1 on system 4): terms (1 − 1/6)/6 = 5/36 and −1/36 for the five others → Σ = 30/1296;
    // naive (Σc² − C²/r)/r² = (1 − 1/6)/36 = 30/1296. At 5 (r = 6, cost 3 on system 6): robust terms 2/36
    // (system 4), 14/36 (system 6), −4/36 (four others) → 264/1296; naive adds (9 − 9/6)/36 = 270/1296 → 300/1296.
    const [at2, at5] = curve.steps;
    expect(at2.stdErrorRobust ** 2).toBeCloseTo(30 / 1296, 14);
    expect(at2.stdErrorNaive ** 2).toBeCloseTo(30 / 1296, 14);
    expect(at5.stdErrorRobust ** 2).toBeCloseTo(264 / 1296, 14);
    expect(at5.stdErrorNaive ** 2).toBeCloseTo(300 / 1296, 14);
    expect(at5.stdError).toBe(at5.stdErrorRobust);
    expect(costMeanCumulativeFunction(artificial, { variance: "naive" }).steps[1].stdError).toBe(at5.stdErrorNaive);
  });

  it("reduces exactly to the count MCF and its Lawless–Nadeau SE when every cost is 1: 1.542688 and 0.311656 at 653 days (REFERENCE case I, valve seats)", () => {
    const costed = valveSeats.map((e) => ({ id: e.id, repairs: e.replacements.map((age) => ({ age, cost: 1 })), endAge: e.end }));
    const cost = costMeanCumulativeFunction(costed);
    const count = meanCumulativeFunction(engines);
    expect(cost.steps.map((s) => [s.age, s.atRisk, s.repairs, s.mcf, s.stdErrorRobust, s.lower, s.upper])).toEqual(
      count.steps.map((s) => [s.age, s.atRisk, s.events, s.mcf, s.stdErrorLawlessNadeau, s.lower, s.upper]),
    );
    const at653 = cost.steps.find((s) => s.age === 653)!;
    expect(Math.abs(at653.mcf - 1.542688)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(at653.stdErrorRobust - 0.311656)).toBeLessThanOrEqual(1e-6);
  });

  it("scales with the currency: costs × 100 give MCF and SE × 100 (common practice, no source)", () => {
    const cents = costMeanCumulativeFunction(artificial.map((u) => ({ ...u, repairs: u.repairs.map((r) => ({ ...r, cost: r.cost * 100 })) })));
    cents.steps.forEach((s, i) => {
      expect(s.mcf).toBeCloseTo(100 * curve.steps[i].mcf, 9);
      expect(s.stdErrorRobust).toBeCloseTo(100 * curve.steps[i].stdErrorRobust, 9);
    });
  });

  it("refuses a negative cost (common practice, no source)", () => {
    expect(() => costMeanCumulativeFunction([{ id: "x", repairs: [{ age: 2, cost: -5 }], endAge: 10 }])).toThrow(RangeError);
  });
});
