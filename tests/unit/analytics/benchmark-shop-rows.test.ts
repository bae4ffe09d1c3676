import { describe, expect, it } from "vitest";
import { groupRow, shopRow, technicianRows } from "../../../server/analytics/benchmark-shop-rows.js";
import { buildLedger, sumCells } from "../../../server/analytics/benchmark-ledger.js";
import { volumeBand } from "../../../server/analytics/benchmark-bands.js";
import type { OriginalLine, RepairLineRecord } from "../../../server/analytics/comebacks.js";

// Wilson: Newcombe (1998), Statistics in Medicine 17:857–872, Table I (REFERENCE.md case F): 81/263 → lower
// 0.2553, 1/29 → 0.0061–0.1718. The technician flag (Wilson lower limit above the group rate) and not rating
// below 30 lines are DOMAIN.md §3 "Shop KPIs" (common practice, no source). Lines are invented.

let seq = 0;
const originals = (technician: string, lines: number, withComeback: number): OriginalLine[] =>
  Array.from({ length: lines }, (_, i) => {
    const line: RepairLineRecord = {
      id: `L${++seq}`, shop: "A", technician, machine: `M${seq}`, system: "Engine", lineType: "failure", customerDamage: false,
      opened: "2024-01-10", closed: "2024-01-10", hourMeter: null,
    };
    return { line, comebacks: i < withComeback ? [{ original: line, followUp: { ...line, id: `F${seq}` }, daysAfterClose: 3, hoursAfterClose: null }] : [] };
  });
const cellOf = (o: OriginalLine[]) => sumCells(buildLedger(o, [], [], "2024-06-30", { days: 30, hours: 100 }), ["A"], ["2024-01"], new Map());

describe("technicianRows(techs, names, p0)", () => {
  it("lists technicians by id, flags one whose Wilson lower limit is above the group rate and does not rate fewer than 30 lines", () => {
    const c = cellOf([...originals("A-T2", 263, 81), ...originals("A-T1", 29, 1)]);
    const rows = technicianRows(c.techs, new Map([["A-T2", "Second"]]), 0.2);
    expect(rows.map((r) => [r.techId, r.name, r.aboveGroup])).toEqual([["A-T1", "A-T1", false], ["A-T2", "Second", true]]);
    expect(rows[0]!.comeback.note).toBe("fewer than 30 lines: not rated");
    expect(rows[1]!.comeback.lower!).toBeCloseTo(0.2553, 4);
  });
});

describe("shopRow(shop, cell, band, p0, anyClaims, techNames)", () => {
  const c = cellOf(originals("A-T1", 263, 81));

  it("shows a named shop with its counts, technicians and drill-down", () => {
    const row = shopRow({ code: "A", name: "Alpha", key: "A", label: "A Alpha", peer: false }, c, volumeBand(263), 0.2, false, new Map());
    expect(row).toMatchObject({ key: "A", shopCode: "A", name: "Alpha", lines: 263, volumeBand: "100–299 lines", drillDown: true });
    expect(row.comeback).toMatchObject({ successes: 81, n: 263, aboveGroup: true });
    expect(row.technicians).toHaveLength(1);
  });

  it("shows a peer without code, name, lines, technicians or drill-down", () => {
    const row = shopRow({ code: "A", name: "Alpha", key: "peer-C", label: "Peer C", peer: true }, c, volumeBand(263), 0.2, false, new Map());
    expect(row).toMatchObject({ key: "peer-C", label: "Peer C", shopCode: null, name: null, lines: null, technicians: null, drillDown: false });
    expect(row.comeback).toMatchObject({ value: 0.308, successes: null, n: null });
  });
});

describe("groupRow(cell, anyClaims)", () => {
  it("gives the group's rate with its interval whatever its size", () => {
    const g = groupRow(cellOf(originals("A-T1", 29, 1)), false);
    expect(g.lines).toBe(29);
    expect(g.comeback.lower!).toBeCloseTo(0.0061, 4);
    expect(g.comeback.upper!).toBeCloseTo(0.1718, 4);
  });
});
