import { describe, expect, it } from "vitest";
import { buildScanCells, failureIdsIn, type CubeRow } from "../../../server/analytics/cluster-cells.js";
import { containedIn, containsCell } from "../../../server/analytics/cluster-scan.js";

// The scan's look-ups are checked against their own definitions (pure logic, no published values):
// the indexed containment must list exactly what containsCell accepts, in the same order, and the
// repair lines named after the scan must be exactly those the cube carries into each cell.

/** A small deterministic generator (a linear congruential sequence), so the cube is the same every run. */
function cube(n: number): CubeRow[] {
  let seed = 7;
  const next = (k: number) => ((seed = (seed * 1103515245 + 12345) % 2147483648), Math.floor(seed / 65536) % k);
  const rows: CubeRow[] = [];
  let id = 0;
  for (let i = 0; i < n; i++) {
    const failures = next(3);
    rows.push({
      engineFamily: `F${next(2)}`,
      buildMonth: `2021-0${1 + next(4)}`,
      lot: `L${next(3)}`,
      shopCode: `S${next(3)}`,
      tempBand: `t${next(2)}`,
      hourBand: `h${next(2)}`,
      failures,
      engineHours: 100 + next(900),
      repairLineIds: Array.from({ length: failures }, () => String(++id)),
    });
  }
  return rows;
}

describe("containedIn(cells)", () => {
  const cells = buildScanCells(cube(300), "hour+temperature");

  it("finds for every cell exactly the cells containsCell says it contains, in list order", () => {
    expect(cells.length).toBeGreaterThan(500);
    expect(cells.some((c) => c.dimensions.build !== "all" && c.dimensions.build.from !== c.dimensions.build.to)).toBe(true);
    const within = containedIn(cells);
    for (const broad of cells) {
      expect(within(broad)).toEqual(cells.filter((s) => containsCell(broad.dimensions, s.dimensions)));
    }
  });
});

describe("failureIdsIn(rows, dimensions)", () => {
  const rows = cube(300);
  const withIds = buildScanCells(rows, "hour+temperature");
  const without = buildScanCells(rows, "hour+temperature", { withIds: false });

  it("names the same repair lines the cube carries into each cell", () => {
    expect(without.every((c) => c.repairLineIds.length === 0)).toBe(true);
    for (const cell of withIds) {
      expect([...failureIdsIn(rows, cell.dimensions)].sort()).toEqual([...new Set(cell.repairLineIds)].sort());
    }
  });
});
