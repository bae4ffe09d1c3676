import { describe, expect, it } from "vitest";
import { peerBands, shopBands, volumeBand } from "../../../server/analytics/benchmark-bands.js";

// Bands of about ×3 (30, 100, 300, 1,000 … lines) and the rule that no band may hold a single peer are the
// product's anonymity design (docs/api.md); common practice, no source. Inputs are invented line counts.

describe("volumeBand(lines)", () => {
  it("puts a count in its band, with the band's middle", () => {
    expect(volumeBand(10)).toEqual({ label: "under 30 lines", mid: 15, from: 0, to: 29 });
    expect(volumeBand(30)).toEqual({ label: "30–99 lines", mid: 65, from: 30, to: 99 });
    expect(volumeBand(2999)).toMatchObject({ label: "1,000–2,999 lines", from: 1000, to: 2999 });
    expect(volumeBand(250000)).toMatchObject({ label: "100,000 lines or more", from: 100000 });
  });
});

describe("peerBands(lines)", () => {
  it("keeps bands that hold two peers or more", () => {
    expect(peerBands([150, 200, 400, 500]).map((b) => b.label)).toEqual(["100–299 lines", "100–299 lines", "300–999 lines", "300–999 lines"]);
  });

  it("merges a peer alone in its band into the nearest band with others", () => {
    // 150, 200, 250 fall in 100–299; 314 alone in 300–999 → all four share 100–999
    expect(peerBands([150, 200, 250, 314]).map((b) => b.label)).toEqual(Array(4).fill("100–999 lines"));
    // 40 alone in 30–99 joins the band above; 5,000 alone in 3,000–9,999 joins the band below
    expect(peerBands([40, 120, 130, 400, 500]).map((b) => b.label)).toEqual(["30–299 lines", "30–299 lines", "30–299 lines", "300–999 lines", "300–999 lines"]);
    expect(peerBands([400, 500, 5000]).map((b) => b.label)).toEqual(Array(3).fill("300–9,999 lines"));
  });

  it("leaves a single peer in its own band: there is nothing to merge with", () => {
    expect(peerBands([500])).toEqual([volumeBand(500)]);
    expect(peerBands([])).toEqual([]);
  });
});

describe("shopBands(named, peers)", () => {
  it("gives named shops their own band and merges the peers' bands", () => {
    const bands = shopBands([["S1", 40]], [["S2", 150], ["S3", 200], ["S4", 314]]);
    expect(bands.get("S1")!.label).toBe("30–99 lines");
    expect(["S2", "S3", "S4"].map((c) => bands.get(c)!.label)).toEqual(Array(3).fill("100–999 lines"));
  });
});
