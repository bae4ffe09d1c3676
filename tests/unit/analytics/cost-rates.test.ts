import { describe, expect, it } from "vitest";
import { costPerThousandHours, costTable } from "../../../server/analytics/cost-rates.js";

// Cost per 1,000 engine hours is a ratio of sums (common practice, no source); the figures are arithmetic written out.
describe("costPerThousandHours(cost, engineHours)", () => {
  it("is 1000 × cost ÷ hours: 4,500 over 30,000 h is 150 per 1,000 h (arithmetic written out)", () => {
    expect(costPerThousandHours(4500, 30_000)).toBe(150);
  });

  it("returns null without engine hours (common practice, no source)", () => {
    expect(costPerThousandHours(120, 0)).toBeNull();
  });
});

describe("costTable(rows, hoursByShop)", () => {
  const t = costTable(
    [
      { shop: "S1", component: "A", lines: 2, partsCost: 300, labourCost: 100 },
      { shop: "S1", component: "B", lines: 1, partsCost: 50, labourCost: 50 },
      { shop: "S2", component: "A", lines: 3, partsCost: 600, labourCost: 300 },
    ],
    new Map([["S1", 10_000], ["S2", 20_000], ["S3", 5_000]]),
  );

  it("sets each shop × component cost against that shop's hours: S1/A 400 over 10,000 h = 40 (arithmetic written out)", () => {
    expect(t.rows.map((r) => [r.shop, r.component, r.cost, r.perThousandHours])).toEqual([
      ["S1", "A", 400, 40],
      ["S1", "B", 100, 10],
      ["S2", "A", 900, 45],
    ]);
  });

  it("keeps a shop with hours and no cost at 0 per 1,000 h (arithmetic written out)", () => {
    expect(t.shops).toEqual([
      { shop: "S1", engineHours: 10_000, cost: 500, lines: 3, perThousandHours: 50 },
      { shop: "S2", engineHours: 20_000, cost: 900, lines: 3, perThousandHours: 45 },
      { shop: "S3", engineHours: 5_000, cost: 0, lines: 0, perThousandHours: 0 },
    ]);
  });

  it("sets a component's cost over all shops against the whole fleet's 35,000 h, highest first (arithmetic written out)", () => {
    expect(t.components.map((c) => [c.component, c.cost, c.perThousandHours])).toEqual([
      ["A", 1300, (1000 * 1300) / 35_000],
      ["B", 100, (1000 * 100) / 35_000],
    ]);
    expect(t.perThousandHours).toBeCloseTo(40, 12);
  });
});
