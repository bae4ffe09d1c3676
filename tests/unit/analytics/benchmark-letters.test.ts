import { describe, expect, it } from "vitest";
import { lettersByRank, peerLetter, shownShops } from "../../../server/analytics/benchmark-letters.js";

// Letters run A … Z, AA, AB, … the way spreadsheet columns are named (bijective base 26; common practice, no
// source). Shop codes and rank keys are invented.

describe("peerLetter(i)", () => {
  it("names peers A to Z, then AA onwards", () => {
    expect([0, 1, 25, 26, 27, 51, 52, 701, 702].map(peerLetter)).toEqual(["A", "B", "Z", "AA", "AB", "AZ", "BA", "ZZ", "AAA"]);
  });
});

describe("lettersByRank(ranked)", () => {
  it("gives letters in the order of the rank keys, not of the codes", () => {
    const letters = lettersByRank([["S1", "c7"], ["S2", "0a"], ["S3", "9f"]]);
    expect([...letters]).toEqual([["S2", "A"], ["S3", "B"], ["S1", "C"]]);
  });
});

describe("shownShops(shops, letters)", () => {
  it("names the shops without a letter first, by code, then the peers by letter", () => {
    const shops = [{ code: "S1", name: "One" }, { code: "S2", name: "Two" }, { code: "S3", name: "Three" }, { code: "S4", name: "Four" }];
    const shown = shownShops(shops, new Map([["S1", "B"], ["S4", "A"]]));
    expect(shown.map((s) => [s.key, s.label, s.peer])).toEqual([
      ["S2", "S2 Two", false],
      ["S3", "S3 Three", false],
      ["peer-A", "Peer A", true],
      ["peer-B", "Peer B", true],
    ]);
    expect(shown[2]).toMatchObject({ code: "S4" });
  });
});
