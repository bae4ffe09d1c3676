import { describe, expect, it } from "vitest";
import { parse } from "csv-parse/sync";
import { blockHeaterCautions, CLEAN_SOCKET_MONTHS, fittingList, partHours, wholeMonths } from "../../../../server/services/winter/fitting-list.js";
import { fittingCsvColumns, fittingListCsv } from "../../../../server/services/winter/fitting-list-csv.js";
import type { FittingCandidate } from "../../../../server/db/queries/fitting-list.js";

const machine = (serial: string, deliveryDate: string, o: Partial<FittingCandidate> = {}): FittingCandidate => ({
  shopCode: "S1", shopName: "Shop one", serial, modelLine: "Loader", engineFamily: "F1", deliveryDate,
  hourMeter: 1000, partFittedHours: 2, partFittedDate: deliveryDate, partName: "Heater-plug set", ...o,
});

describe("wholeMonths(from, to)", () => {
  it("counts a month once its day of the month is reached", () => {
    // date-fns documentation, differenceInMonths: 31 January 2014 → 1 September 2014 is 7 full months
    expect(wholeMonths("2014-01-31", "2014-09-01")).toBe(7);
    expect(wholeMonths("2023-06-30", "2025-06-29")).toBe(23);
    expect(wholeMonths("2023-06-30", "2025-06-30")).toBe(24);
    expect(wholeMonths("2025-06-30", "2025-06-01")).toBe(0);
  });
});

describe("partHours(candidate)", () => {
  it("is the hour meter less the hours when the part was fitted, never negative, unknown without readings", () => {
    expect(partHours({ hourMeter: 1234.5, partFittedHours: 234.5 })).toBe(1000);
    expect(partHours({ hourMeter: 10, partFittedHours: 12 })).toBe(0);
    expect(partHours({ hourMeter: null, partFittedHours: 3 })).toBeNull();
  });
});

describe("fittingList(candidates, asOf)", () => {
  const asOf = "2025-06-30";
  const rows = fittingList(
    [
      machine("OLD-LOW", "2021-05-01", { hourMeter: 3000, partFittedHours: 2500, partFittedDate: "2024-01-10" }),
      machine("NEW-A", "2025-05-02"),
      machine("OLD-HIGH", "2022-01-01", { hourMeter: 4000, partFittedHours: 3 }),
      machine("EDGE", "2023-06-30"),
      machine("NEW-B", "2024-11-20"),
      machine("OLD-NONE", "2020-01-01", { hourMeter: null, partFittedHours: null }),
      machine("JUST-OVER", "2023-05-30", { hourMeter: 800, partFittedHours: 1 }),
    ],
    asOf,
  );

  it("lists deliveries within the clean-socket months first, newest first, then the longest-serving cold-start parts", () => {
    expect(rows.map((r) => r.serial)).toEqual(["NEW-A", "NEW-B", "EDGE", "OLD-HIGH", "JUST-OVER", "OLD-LOW", "OLD-NONE"]);
    expect(rows.map((r) => r.priority)).toEqual(["clean-socket", "clean-socket", "clean-socket", "old-cold-start-parts", "old-cold-start-parts", "old-cold-start-parts", "old-cold-start-parts"]);
  });

  it("counts the age in whole months and says why each machine is listed", () => {
    const edge = rows.find((r) => r.serial === "EDGE")!;
    expect(edge.ageMonths).toBe(CLEAN_SOCKET_MONTHS);
    expect(rows.find((r) => r.serial === "JUST-OVER")!.ageMonths).toBe(CLEAN_SOCKET_MONTHS + 1);
    expect(rows[0].why).toBe("Delivered 1 month ago: fit while the socket is still clean.");
    expect(rows.find((r) => r.serial === "OLD-LOW")!.why).toMatch(/allow time to clean it; heater-plug set replaced since delivery/);
    expect(rows.find((r) => r.serial === "OLD-HIGH")!.why).toMatch(/still the ones fitted at delivery/);
    expect(rows.find((r) => r.serial === "OLD-HIGH")!.coldStartPartHours).toBe(3997);
  });
});

describe("blockHeaterCautions()", () => {
  it("takes the block-heater cautions and the deference to the maker's manual from the product's caution list", () => {
    const c = blockHeaterCautions();
    expect(c).toHaveLength(2);
    // the trade's block-heater cautions (DOMAIN.md, safety: common practice, no source)
    for (const words of ["grounded plug", "outdoor-rated heavy-gauge cord", "GFCI outlet", "corrosion", "arcing", "hot coolant", "licensed electrician"]) expect(c[0]).toContain(words);
    expect(c[1]).toMatch(/maker's service manual.*local codes and licensed practice/);
  });
});

describe("fittingListCsv(rows)", () => {
  it("writes one RFC 4180 record per row under the unit-bearing header, neutralising formula-like text", () => {
    const rows = fittingList([machine("=CMD", "2025-01-15", { hourMeter: 12.6, partFittedHours: 2.2, modelLine: 'Loader, "big"' })], "2025-06-30");
    // csv-parse, an independent RFC 4180 reader, reads back what was written
    const [header, record, ...rest] = parse(fittingListCsv(rows)) as string[][];
    expect(header).toEqual([...fittingCsvColumns]);
    expect(header.filter((h) => /_(h|months)$/.test(h))).toEqual(["age_months", "hour_meter_h", "cold_start_part_age_h"]);
    expect(rest).toEqual([]);
    expect(record[2]).toBe("'=CMD"); // OWASP "CSV Injection": a leading apostrophe keeps the cell as text
    expect(record[3]).toBe('Loader, "big"');
    expect(record.slice(5, 8)).toEqual(["2025-01-15", "5", "13"]);
    expect(record[10]).toBe("10");
  });
});
