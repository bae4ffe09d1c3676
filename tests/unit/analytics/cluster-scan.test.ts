import { describe, expect, it } from "vitest";
import {
  ALL,
  collapseBuildWindows,
  containsCell,
  describeCell,
  formatBuildWindow,
  scanClusters,
  type CellDimensions,
  type ScanCell,
} from "../../../server/analytics/cluster-scan.js";
import { benjaminiHochberg } from "../../../server/analytics/fdr.js";
import { poissonExcessPValue } from "../../../server/analytics/poisson.js";

const everything: CellDimensions = {
  engineFamily: ALL,
  build: ALL,
  supplierLot: ALL,
  shop: ALL,
  temperatureBand: ALL,
  hourBand: ALL,
};

const cell = (dimensions: Partial<CellDimensions>, observed: number, expected: number, ids: string[] = []): ScanCell => ({
  dimensions: { ...everything, ...dimensions },
  observed,
  expected,
  repairLineIds: ids,
});

const month = (ym: string) => ({ from: ym, to: ym });

describe("containsCell(broad, specific)", () => {
  it("holds when every dimension of the broad cell is all or equal, build windows nested (common practice, no source)", () => {
    const family = { ...everything, engineFamily: "K26-4R" };
    const lot = { ...family, supplierLot: "BT-2109", build: { from: "2021-10", to: "2021-11" } };
    expect(containsCell(family, lot)).toBe(true);
    expect(containsCell({ ...family, build: { from: "2021-09", to: "2021-12" } }, lot)).toBe(true);
    expect(containsCell({ ...family, build: month("2021-10") }, lot)).toBe(false);
    expect(containsCell(lot, family)).toBe(false);
    expect(containsCell(family, family)).toBe(false);
    expect(containsCell({ ...everything, engineFamily: "K18-3R" }, lot)).toBe(false);
  });
});

describe("scanClusters(cells, options)", () => {
  // A family-wide excess that is entirely one lot, plus a shop slice that adds nothing beyond the family.
  // Exact 95 % limits (Garwood): 41/9.6 → ratio 4.27, lower 3.06; remainder of the family 9/15.4 → lower 0.27;
  // shop slice 14/6 → ratio 2.33, lower 1.28 ≤ family ratio 50/25 = 2.0.
  const family = cell({ engineFamily: "K26-4R" }, 50, 25);
  const lot = cell({ engineFamily: "K26-4R", supplierLot: "BT-2109" }, 41, 9.6);
  const shop = cell({ engineFamily: "K26-4R", shop: "S1" }, 14, 6);
  const quiet = cell({ engineFamily: "K18-3R" }, 10, 10);
  const result = scanClusters([family, lot, shop, quiet], { subject: "Heater-plug set" });

  it("computes p = P(X ≥ O | E) and BH q over every tested cell (Benjamini & Hochberg 1995; exact Poisson tail)", () => {
    const pValues = [family, lot, shop, quiet].map((c) => poissonExcessPValue(c.observed, c.expected));
    expect(result.tested.map((c) => c.pValue)).toEqual(pValues);
    expect(result.tested.map((c) => c.qValue)).toEqual(benjaminiHochberg(pValues).adjusted);
  });

  it("drops the family cell whose excess is all inside the lot, and the shop slice that adds nothing (merge rules in the JSDoc; arithmetic above)", () => {
    expect(result.signals.map((s) => s.dimensions)).toEqual([lot.dimensions]);
    const reasons = result.dropped.map((d) => [d.cell.dimensions, d.reason]);
    expect(reasons).toContainEqual([family.dimensions, "explained-by-contained-cell"]);
    expect(reasons).toContainEqual([shop.dimensions, "no-extra-signal"]);
  });

  it("keeps a broad cell whose remainder still shows an excess (merge rule 2; arithmetic written out)", () => {
    // Family 90/40 (ratio 2.25, below the lot's lower limit 3.06) minus lot 41/9.6 leaves 49 where 30.4 were
    // expected: ratio 1.61, exact lower limit 36.25/30.4 ≈ 1.19 > 1.
    const strongFamily = cell({ engineFamily: "K26-4R" }, 90, 40);
    const kept = scanClusters([strongFamily, lot], { subject: "Heater-plug set" }).signals.map((s) => s.dimensions);
    expect(kept).toHaveLength(2);
    expect(kept).toEqual(expect.arrayContaining([strongFamily.dimensions, lot.dimensions]));
  });

  it("ranks by p, then by excess O − E when p ties (here both p underflow to 0) (ranking rule in the JSDoc)", () => {
    const a = cell({ shop: "S1" }, 200, 1);
    const b = cell({ shop: "S2" }, 300, 1);
    const ranked = scanClusters([a, b], { subject: "Battery" }).signals;
    expect(ranked.map((s) => [s.dimensions.shop, s.rank])).toEqual([
      ["S2", 1],
      ["S1", 2],
    ]);
  });

  it("keeps only q strictly below a configurable threshold (options.qThreshold)", () => {
    const loose = scanClusters([shop, quiet], { subject: "x", qThreshold: 0.05 }).signals.length;
    const strict = scanClusters([shop, quiet], { subject: "x", qThreshold: 1e-6 }).signals.length;
    expect([loose, strict]).toEqual([1, 0]);
  });

  it("leaves cells with nothing expected untested and out of the BH count (common practice, no source)", () => {
    const scan = scanClusters([cell({ shop: "S9" }, 3, 0), quiet], { subject: "x" });
    expect(scan.untested).toHaveLength(1);
    expect(scan.tested).toHaveLength(1);
    expect(scan.tested[0].qValue).toBe(scan.tested[0].pValue);
  });
});

describe("describeCell(cell, subject)", () => {
  it("writes one plain sentence with the counts, the ratio and its exact 95 % interval (Garwood limits of 41: 29.42–55.62)", () => {
    const [scanned] = scanClusters(
      [cell({ engineFamily: "K26-4R", build: { from: "2021-09", to: "2021-12" }, supplierLot: "BT-2109" }, 41, 9.6)],
      { subject: "Heater-plug set" },
    ).tested;
    expect(describeCell(scanned, "Heater-plug set")).toBe(
      "Heater-plug set on engine family K26-4R built Sep–Dec 2021, lot BT-2109: 41 failures where 9.6 were expected (ratio 4.3, 95 % CI 3.1–5.8)",
    );
  });

  it("names shop, temperature band and hour band through the given labels (common practice, no source)", () => {
    const [scanned] = scanClusters([cell({ shop: "N04", temperatureBand: "0-20F", hourBand: "1k-2k" }, 1, 0.5)], {
      subject: "Starter motor",
      qThreshold: 1,
    }).tested;
    const text = describeCell(scanned, "Starter motor", { shop: () => "North Ridge", temperatureBand: () => "0–20 °F" });
    expect(text).toBe(
      "Starter motor at shop North Ridge, daily minimum 0–20 °F, at 1k-2k: 1 failure where 0.50 were expected (ratio 2.0, 95 % CI 0.1–11.1)",
    );
  });
});

describe("formatBuildWindow(range)", () => {
  it("writes one month, a window within a year, or a window across years (common practice, no source)", () => {
    expect(formatBuildWindow(month("2021-09"))).toBe("Sep 2021");
    expect(formatBuildWindow({ from: "2021-09", to: "2021-12" })).toBe("Sep–Dec 2021");
    expect(formatBuildWindow({ from: "2021-11", to: "2022-02" })).toBe("Nov 2021–Feb 2022");
  });
});

describe("collapseBuildWindows(cells)", () => {
  it("merges consecutive build months of otherwise-equal cells, summing counts, and breaks at a gap (arithmetic written out)", () => {
    const lotMonth = (ym: string, o: number, e: number, id: string): ScanCell =>
      cell({ engineFamily: "K26-4R", supplierLot: "BT-2109", build: month(ym) }, o, e, [id]);
    const merged = collapseBuildWindows([
      lotMonth("2021-11", 12, 2.5, "r3"),
      lotMonth("2021-09", 9, 2.4, "r1"),
      lotMonth("2021-10", 11, 2.3, "r2"),
      lotMonth("2021-12", 9, 2.4, "r4"),
      lotMonth("2022-02", 1, 2.2, "r5"),
      cell({ engineFamily: "K26-4R", supplierLot: "OTHER", build: month("2021-10") }, 2, 2, ["r6"]),
    ]);
    const summary = merged.map((c) => [c.dimensions.supplierLot, c.dimensions.build, c.observed, Number(c.expected.toFixed(6)), c.repairLineIds]);
    // Sep–Dec: 9 + 11 + 12 + 9 = 41 observed, 2.4 + 2.3 + 2.5 + 2.4 = 9.6 expected.
    expect(summary).toEqual([
      ["BT-2109", { from: "2021-09", to: "2021-12" }, 41, 9.6, ["r1", "r2", "r3", "r4"]],
      ["BT-2109", { from: "2022-02", to: "2022-02" }, 1, 2.2, ["r5"]],
      ["OTHER", { from: "2021-10", to: "2021-10" }, 2, 2, ["r6"]],
    ]);
  });

  it("passes cells without a build restriction through unchanged (common practice, no source)", () => {
    const family = cell({ engineFamily: "K26-4R" }, 50, 25);
    expect(collapseBuildWindows([family])).toEqual([family]);
  });
});

describe("scanClusters: a floor of failures per reported cell", () => {
  // Two failures where 0.01 were expected: P(X ≥ 2 | 0.01) = 1 − e^−0.01 (1 + 0.01) ≈ 4.97e-5, so q passes 0.05
  // on its own; three failures where 0.5 were expected pass too. The floor (3, common practice, no source) keeps
  // the two-failure cell out of the signals but not out of the tested cells.
  const tiny = cell({ supplierLot: "OC-0000", shop: "S8" }, 2, 0.01);
  const three = cell({ supplierLot: "OC-0001" }, 3, 0.05);
  it("does not report a cell of fewer than three failures, however small its expectation", () => {
    expect(1 - Math.exp(-0.01) * 1.01).toBeCloseTo(poissonExcessPValue(2, 0.01), 12);
    const r = scanClusters([tiny, three], { subject: "Heater-plug set" });
    expect(r.tested.every((c) => c.qValue < 0.05)).toBe(true);
    expect(r.signals.map((s) => s.dimensions.supplierLot)).toEqual(["OC-0001"]);
    const all = scanClusters([tiny, three], { subject: "Heater-plug set", minObserved: 1 });
    expect(all.signals.map((s) => s.dimensions.supplierLot).sort()).toEqual(["OC-0000", "OC-0001"]);
  });
});
