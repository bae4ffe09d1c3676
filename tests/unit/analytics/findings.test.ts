import { describe, expect, it } from "vitest";
import { ALL, scanClusters, type CellDimensions, type ClusterSignal, type ScanCell } from "../../../server/analytics/cluster-scan.js";
import { buildPartCells, failureIdsIn, type CubeRow } from "../../../server/analytics/cluster-cells.js";
import { facetWords, findingSentence, groupFindings } from "../../../server/analytics/findings.js";

// Grouping the scan's kept signals into findings is bookkeeping over containment and shared repair lines: the
// checks are of the rules themselves on hand-made cells, no outside figure is involved. The sentence's numbers
// are the scan's own (ratio, exact interval), whose checks against published references are in
// cluster-scan.test.ts and poisson.test.ts.

const dims = (d: Partial<CellDimensions>): CellDimensions => ({
  component: "P", engineFamily: ALL, build: ALL, supplierLot: ALL, shop: ALL, temperatureBand: ALL, hourBand: ALL, ...d,
});

let rank = 0;
function signal(d: Partial<CellDimensions>, observed: number, expected: number, lines: string[], r = ++rank): ClusterSignal {
  return {
    dimensions: dims(d), observed, expected, repairLineIds: lines,
    ratio: { observed, expected, ratio: observed / expected, lower: observed / expected / 2, upper: (observed / expected) * 2, level: 0.95 },
    pValue: r / 1000, qValue: r / 100, rank: r, description: "", absorbed: [],
  };
}
const ids = (prefix: string, n: number) => Array.from({ length: n }, (_, i) => `${prefix}${i}`);

describe("findings", () => {
  it("put the narrower cells of a lot inside the lot's finding, as facets, and keep other signals apart", () => {
    rank = 0;
    const lot = signal({ supplierLot: "L1" }, 40, 8, ids("a", 40));
    const lotShop = signal({ supplierLot: "L1", shop: "S2" }, 12, 1, ids("a", 12));
    const shop = signal({ shop: "S5" }, 10, 3, ids("b", 10));
    const lotCold = signal({ supplierLot: "L1", temperatureBand: "cold" }, 9, 1, ids("a", 9).slice(3));
    const f = groupFindings([lotCold, shop, lotShop, lot]);
    expect(f.map((x) => x.lead)).toEqual([lot, shop]);
    expect(f[0].facets).toEqual([lotShop, lotCold]);
    expect(f[0].facetKinds).toEqual(["narrower", "narrower"]);
    expect(f[1].facets).toEqual([]);
    expect(f.map((x) => x.rank)).toEqual([1, 2]);
    expect(f.map((x) => x.cells)).toEqual([3, 1]);
  });

  it("fold a signal described by other dimensions into the finding whose failures it mostly is", () => {
    rank = 0;
    const lot = signal({ supplierLot: "L1" }, 30, 6, ids("a", 30));
    // a build window and shop that hold the lot's machines: 4 of its 5 lines are the lot's
    const window = signal({ build: { from: "2021-09", to: "2021-11" }, shop: "S8" }, 5, 0.1, [...ids("a", 4), "z"]);
    // half of its lines only: a finding of its own
    const other = signal({ shop: "S6" }, 8, 2, [...ids("a", 4), ...ids("c", 4)]);
    const f = groupFindings([lot, window, other]);
    expect(f.map((x) => x.lead)).toEqual([lot, other]);
    expect(f[0].facets).toEqual([window]);
    expect(f[0].facetKinds).toEqual(["same-failures"]);
  });

  it("never mix parts: a relay's signal is not a facet of a plug lot's finding even when it shares machines", () => {
    rank = 0;
    const plug = signal({ component: "PLUG", supplierLot: "L1" }, 30, 6, ids("a", 30));
    const relay = signal({ component: "RELAY", shop: "S2" }, 6, 1, ids("a", 6));
    const f = groupFindings([plug, relay]);
    expect(f.map((x) => x.lead)).toEqual([plug, relay]);
  });

  it("say in words what a facet adds to its lead", () => {
    expect(facetWords(dims({ supplierLot: "L1" }), dims({ supplierLot: "L1", shop: "S2", temperatureBand: "t1" }), { temperatureBand: () => "0 to 20 °F" })).toBe(
      "at shop S2, daily minimum 0 to 20 °F",
    );
    expect(facetWords(dims({ supplierLot: "L1", build: { from: "2021-09", to: "2021-12" } }), dims({ supplierLot: "L1", build: { from: "2021-09", to: "2021-09" } }))).toBe("built Sep 2021");
  });

  it("read as a sentence: part, lot, machines, the ratio with its interval, the counts, what it is not and where it is strongest", () => {
    rank = 0;
    const lead = signal({ component: "PLUG", supplierLot: "BT-1", engineFamily: "F1", build: { from: "2021-09", to: "2021-12" } }, 75, 9, []);
    lead.ratio = { observed: 75, expected: 9, ratio: 75 / 9, lower: 6.55, upper: 10.45, level: 0.95 };
    const facet = signal({ component: "PLUG", supplierLot: "BT-1", engineFamily: "F1", build: { from: "2021-09", to: "2021-09" } }, 22, 1.6, []);
    facet.ratio = { ...facet.ratio, ratio: 13.75, lower: 8.6 };
    const text = findingSentence({ lead, facets: [facet] }, { partName: () => "Heater-plug set", subject: "Cold-start aids", standardise: "hour+temperature" });
    expect(text).toBe(
      "Heater-plug set failures with lot BT-1 (engine family F1, built Sep–Dec 2021) happen about 8.3 times as often as expected for the same engine hours and weather " +
        "(95 % CI 6.5–10): 75 failures where 9.0 were expected. Colder weather and higher engine hours do not explain it: the expected count allows for both. " +
        "Strongest: built Sep 2021, 14 times as often.",
    );
  });
});

describe("a scan part by part", () => {
  const row = (component: string, lot: string, shopCode: string, failures: number, engineHours: number, keys: string[] = []): CubeRow => ({
    component, engineFamily: "F1", buildMonth: "2021-09", lot, shopCode, tempBand: "t", hourBand: "h", failures, engineHours, repairLineIds: keys,
  });

  it("labels every cell with its part, counts only that part's failures, and names only that part's lines", () => {
    const rows = [
      row("PLUG", "L1", "S1", 20, 1000, ids("p", 20)),
      row("PLUG", "L2", "S1", 2, 1000, ids("q", 2)),
      row("RELAY", "not tracked", "S1", 3, 2000, ids("r", 3)),
    ];
    const cells: ScanCell[] = buildPartCells(rows, "hour");
    expect(new Set(cells.map((c) => c.dimensions.component))).toEqual(new Set(["PLUG", "RELAY"]));
    const plugAll = cells.find((c) => c.dimensions.component === "PLUG" && c.dimensions.supplierLot === ALL && c.dimensions.shop === ALL)!;
    expect(plugAll.observed).toBe(22);
    const relayAll = cells.find((c) => c.dimensions.component === "RELAY" && c.dimensions.shop === ALL)!;
    expect(relayAll.observed).toBe(3);
    // a relay cell never carries a plug lot
    expect(cells.filter((c) => c.dimensions.component === "RELAY").every((c) => c.dimensions.supplierLot === ALL || c.dimensions.supplierLot === "not tracked")).toBe(true);
    expect(failureIdsIn(rows, { ...plugAll.dimensions, supplierLot: "L1" })).toEqual(ids("p", 20));
    expect(failureIdsIn(rows, relayAll.dimensions)).toEqual(ids("r", 3));
    // cells of two parts are never nested, so the containment rules cannot drop one for the other
    const scan = scanClusters(cells, { subject: "Parts", qThreshold: 0.99 });
    for (const d of scan.dropped) expect(d.cell.dimensions.component).toBe(d.by.component);
  });
});
