import { describe, expect, it } from "vitest";
import { buildScanCells, referenceRates, type CubeRow } from "../../../server/analytics/cluster-cells.js";
import { ALL } from "../../../server/analytics/cluster-scan.js";

// Indirect standardisation (expected = Σ exposure × reference rate of the stratum) is the textbook method;
// these tests pin the bookkeeping with the arithmetic written out (pure logic, no published values).
const row = (p: Partial<CubeRow>): CubeRow => ({
  engineFamily: "F1", buildMonth: "2021-01", lot: "L1", shopCode: "A", tempBand: "cold", hourBand: "h1",
  failures: 0, engineHours: 0, repairLineIds: [], ...p,
});

const cube: CubeRow[] = [
  row({ failures: 6, engineHours: 1000, repairLineIds: ["a", "b", "c", "d", "e", "f"] }),
  row({ buildMonth: "2021-02", lot: "L2", failures: 1, engineHours: 1000, repairLineIds: ["g"] }),
  row({ engineFamily: "F2", buildMonth: "2021-03", lot: "L2", shopCode: "B", tempBand: "mild", failures: 1, engineHours: 2000, repairLineIds: ["h"] }),
];

describe("referenceRates(rows, by)", () => {
  it("divides failures by engine hours per stratum", () => {
    // hour+temperature: h1|cold = (6 + 1) / 2000 = 0.0035; h1|mild = 1 / 2000 = 0.0005
    const r = referenceRates(cube, "hour+temperature");
    expect(r.get("h1|cold")).toBeCloseTo(0.0035, 12);
    expect(r.get("h1|mild")).toBeCloseTo(0.0005, 12);
    // hour only: h1 = 8 / 4000 = 0.002
    expect(referenceRates(cube, "hour").get("h1")).toBeCloseTo(0.002, 12);
  });
});

describe("buildScanCells(rows, by)", () => {
  const cells = buildScanCells(cube, "hour");
  const find = (pred: (d: (typeof cells)[number]["dimensions"]) => boolean) => cells.filter((c) => pred(c.dimensions));

  it("makes the whole group a cell whose expected equals its observed", () => {
    const all = find((d) => Object.values(d).every((v) => v === ALL));
    expect(all).toHaveLength(1);
    expect(all[0].observed).toBe(8);
    expect(all[0].expected).toBeCloseTo(8, 10); // 4000 h × 0.002
  });

  it("gives a lot its failures and its exposure at the group's rate, and names the family and build window it is confined to", () => {
    // lot L1 alone: 6 failures, 1000 h × 0.002 = 2 expected; all of it is family F1 built Jan 2021
    const l1 = find((d) => d.supplierLot === "L1" && d.shop === ALL && d.temperatureBand === ALL && d.hourBand === ALL);
    expect(l1).toHaveLength(1);
    expect(l1[0]).toMatchObject({ observed: 6, repairLineIds: ["a", "b", "c", "d", "e", "f"] });
    expect(l1[0].expected).toBeCloseTo(2, 10);
    expect(l1[0].dimensions.engineFamily).toBe("F1");
    expect(l1[0].dimensions.build).toEqual({ from: "2021-01", to: "2021-01" });
  });

  it("keeps a lot spread over two families and non-adjacent months without a family or window", () => {
    // lot L2: rows of F1 (Feb) and F2 (Mar): two families, two consecutive months → window Feb–Mar 2021
    const l2 = find((d) => d.supplierLot === "L2" && d.shop === ALL && d.temperatureBand === ALL && d.hourBand === ALL && d.engineFamily === ALL);
    expect(l2).toHaveLength(1);
    expect(l2[0].observed).toBe(2);
    expect(l2[0].expected).toBeCloseTo(6, 10); // 3000 h × 0.002
    expect(l2[0].dimensions.build).toEqual({ from: "2021-02", to: "2021-03" });
  });

  it("lists each distinct cell once", () => {
    const keys = cells.map((c) => JSON.stringify(c.dimensions));
    expect(new Set(keys).size).toBe(keys.length);
  });
});
