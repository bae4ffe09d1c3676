import { describe, expect, it } from "vitest";
import { readFilters } from "../../../src/features/filters/use-filters.js";

describe("readFilters(params)", () => {
  it("refuses a From date after the To date in words, keeps what was typed, and still applies the other filters", () => {
    const r = readFilters(new URLSearchParams("from=2025-03-01&to=2025-01-31&shops=S3&components=ENG-CSA-HPLUG"));
    expect(r.problems).toEqual(["The From date is after the To date: the dates are not applied."]);
    expect(r.filters.from).toBeUndefined();
    expect(r.filters.to).toBeUndefined();
    expect(r.filters.shops).toEqual(["S3"]);
    expect(r.typed).toMatchObject({ from: "2025-03-01", to: "2025-01-31" });
    expect(r.search).toBe("shops=S3&components=ENG-CSA-HPLUG");
  });

  it("says which filter it cannot read and keeps the dates that are fine", () => {
    const r = readFilters(new URLSearchParams("from=2025-01-01&to=2025-02-01&buildFrom=2021-13"));
    expect(r.problems).toEqual(["Built from: use a month like 2021-09; not applied."]);
    expect(r.filters).toMatchObject({ from: "2025-01-01", to: "2025-02-01" });
    expect(r.filters.buildFrom).toBeUndefined();
  });

  it("has no problem with filters in order", () => {
    expect(readFilters(new URLSearchParams("from=2025-01-01&to=2025-01-01")).problems).toEqual([]);
  });
});
