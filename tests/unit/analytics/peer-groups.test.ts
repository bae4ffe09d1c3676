import { describe, expect, it } from "vitest";
import { cutIndices, GROUP_HIDDEN, groupFigureShown, MIN_PEERS, peerSpread, peerSummary, roundTo } from "../../../server/analytics/peer-groups.js";
import type { ShopBenchmark } from "../../../shared/schemas/benchmarks.js";

// The rule is the product's peer-anonymity design. Its threshold, no shown group of fewer than three
// contributors, is the "threshold rule" of statistical disclosure control (Hundepool et al., Statistical
// Disclosure Control, Wiley 2012, §4 on the minimum frequency rule; the value 3 from memory), and groups that
// hide a record among at least k others are k-anonymity (Sweeney, Int. J. Uncertainty, Fuzziness and
// Knowledge-Based Systems 10(5), 2002). Inputs are invented figures.

const pctText = (x: number) => `${Math.round(100 * x)} %`;
const dayText = (x: number) => `${Math.round(x)} d`;

/** A small deterministic generator (mulberry32) for the property checks. */
function prng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe("roundTo(x, step)", () => {
  it("rounds to the step without binary noise", () => {
    expect(roundTo(0.0449, 0.01)).toBe(0.04);
    expect(roundTo(0.045, 0.01)).toBe(0.05);
    expect(roundTo(12.5, 1)).toBe(13);
    expect(roundTo(314, 10)).toBe(310);
  });
});

describe("cutIndices(rounded)", () => {
  it("cuts seven shops into two groups of three and four where the figure changes", () => {
    // 3.5 is the ideal cut: both neighbours are as near, the lower one is taken
    expect(cutIndices([1, 2, 3, 4, 5, 6, 7])).toEqual([3]);
    // a tie across the middle: the nearest change that keeps three a side, or none
    expect(cutIndices([1, 2, 3, 3, 3, 6, 7])).toEqual([]);
    expect(cutIndices([1, 2, 3, 3, 3, 6, 7, 8])).toEqual([5]);
  });

  it("cuts nine shops or more into thirds", () => {
    expect(cutIndices([1, 2, 3, 4, 5, 6, 7, 8, 9])).toEqual([3, 6]);
    expect(cutIndices([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])).toEqual([4, 8]);
  });

  it("gives no cut when no change leaves three shops on each side", () => {
    expect(cutIndices([1, 2, 3, 4, 5])).toEqual([]);
    expect(cutIndices([4, 4, 4, 4, 4, 4, 9])).toEqual([]);
    expect(cutIndices([1, 4, 4, 4, 4, 4, 4])).toEqual([]);
  });
});

describe("peerSpread(values, step, unit)", () => {
  it("shows seven comeback rates as two groups of three or more with rounded cut points, and no shop's own figure", () => {
    const rates = [0.031, 0.044, 0.052, 0.049, 0.061, 0.038, 0.171];
    const s = peerSpread(rates, 0.01, pctText);
    expect(s.groups).toEqual([
      { shops: 3, from: null, to: 0.05 },
      { shops: 4, from: 0.05, to: null },
    ]);
    expect(s.words).toBe("3 below 5 % · 4 at 5 % or more");
    // the outlier (17.1 %) and the lowest (3.1 %) appear nowhere, exact or rounded
    expect(JSON.stringify(s)).not.toMatch(/0\.17|0\.171|0\.03[^0-9]|0\.031/);
  });

  it("is the same whatever order the shops come in", () => {
    const next = prng(7);
    const rates = Array.from({ length: 11 }, () => Math.round(next() * 300) / 1000);
    const base = peerSpread(rates, 0.01, pctText);
    for (let k = 0; k < 20; k++) {
      const shuffled = [...rates].sort(() => next() - 0.5);
      expect(peerSpread(shuffled, 0.01, pctText)).toEqual(base);
    }
  });

  it("does not move when an extreme shop's figure moves: the top shop only ever shows as in the top group", () => {
    const waits = [2, 3, 3, 4, 5, 6, 40];
    const a = peerSpread(waits, 1, dayText);
    const b = peerSpread([2, 3, 3, 4, 5, 6, 95], 1, dayText);
    expect(b).toEqual(a);
    expect(a.words).toBe("3 below 4 d · 4 at 4 d or more");
  });

  it("shows nothing below three shops, and only the count below six", () => {
    expect(peerSpread([0.1, 0.2], 0.01, pctText)).toMatchObject({ shops: 2, groups: [], words: "fewer than 3 other shops have this figure: not shown" });
    expect(peerSpread([0.1, null, null, 0.2, 0.3], 0.01, pctText)).toMatchObject({ shops: 3, groups: [{ shops: 3, from: null, to: null }] });
    expect(peerSpread([0.1, 0.2, 0.3, 0.4, 0.5], 0.01, pctText).words).toMatch(/^5 other shops: too few/);
  });

  it("never shows a group of fewer than three shops, and each group's range holds exactly its shops (10,000 random cases)", () => {
    const next = prng(2025);
    for (let k = 0; k < 10_000; k++) {
      const n = 3 + Math.floor(next() * 20);
      const values = Array.from({ length: n }, () => (next() < 0.1 ? null : Math.round(next() * next() * 400) / 1000));
      const s = peerSpread(values, 0.01, pctText);
      const rounded = values.filter((v): v is number => v !== null).map((v) => roundTo(v, 0.01));
      for (const g of s.groups) {
        expect(g.shops).toBeGreaterThanOrEqual(MIN_PEERS);
        const inside = rounded.filter((r) => (g.from === null || r >= g.from) && (g.to === null || r < g.to)).length;
        expect(inside).toBe(g.shops);
      }
      expect(s.groups.length).toBeLessThanOrEqual(3);
      if (s.groups.length > 1) expect(s.groups.reduce((t, g) => t + g.shops, 0)).toBe(rounded.length);
    }
  });
});

describe("peerSummary(rows)", () => {
  const share = (value: number | null) => ({ value, lower: null, upper: null, successes: null, n: null, note: null });
  const row = (lines: number, comeback: number, wait: number): ShopBenchmark => ({
    key: "x", label: "x", peer: false, shopCode: "x", name: "x", lines, volumeBand: "",
    comeback: { ...share(comeback), funnel: "within", words: "", aboveGroup: false },
    efficiency: { value: 0.9, standardHours: 1, actualHours: 1, lines: 1, note: null },
    partsWait: { median: wait, p90: wait * 2, n: 10, note: null },
    backOrder: share(0.1), coldStartMeasured: share(null), warrantyOnTime: share(null), technicians: [], drillDown: true,
  });

  it("keeps no figure of one shop: the unusual parts wait of one shop is nowhere in the answer", () => {
    const rows = [row(410, 0.04, 2), row(520, 0.05, 3), row(630, 0.045, 2.5), row(700, 0.06, 3.5), row(380, 0.035, 4), row(450, 0.055, 3), row(900, 0.041, 37.3)];
    const s = peerSummary(rows);
    const json = JSON.stringify(s);
    expect(json).not.toMatch(/37|74\.6|75|900|380/);
    expect(s.shops).toBe(7);
    // medians 2, 2.5, 3, 3, 3.5, 4, 37.3 → whole days 2, 3, 3, 3, 4, 4, 37: the 3s cannot be split, so 4 | 3
    expect(s.partsWaitMedian.words).toBe("4 below 4 d · 3 at 4 d or more");
    expect(s.coldStartMeasured.words).toBe("fewer than 3 other shops have this figure: not shown");
    expect(s.rule).toMatch(/at least 3 shops/);
  });
});

describe("groupFigureShown(groupWide, otherShopsWithData)", () => {
  // the threshold rule (Hundepool et al. 2012, value 3 from memory): a total a caller can difference down to
  // fewer than three other contributors is not released
  it("always shows the group to a group-wide caller", () => {
    expect(groupFigureShown(true, 0)).toBe(true);
    expect(groupFigureShown(true, 1)).toBe(true);
  });

  it("hides the group from a caller limited to some shops when fewer than three other shops hold data", () => {
    expect([0, 1, 2].map((n) => groupFigureShown(false, n))).toEqual([false, false, false]);
    expect([3, 4, 7].map((n) => groupFigureShown(false, n))).toEqual([true, true, true]);
    expect(MIN_PEERS).toBe(3);
  });

  it("says why in words", () => {
    expect(GROUP_HIDDEN).toBe("The group figure is hidden: fewer than three other shops to compare with.");
  });
});
