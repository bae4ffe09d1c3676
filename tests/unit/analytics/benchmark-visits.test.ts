import { describe, expect, it } from "vitest";
import { visits } from "../../../server/analytics/benchmark-visits.js";
import type { ComebackFigure, ShopBenchmark, TechnicianRow } from "../../../shared/schemas/benchmarks.js";

// The visit rule is the product's (shared/schemas/benchmarks.ts: above 99.8 % → visit; above 95 % or a Wilson
// lower limit above the group rate → watch; common practice, no source). The interval 0.2553–0.3662 of 81/263
// is Newcombe (1998) Table I. Rows are invented.

const comeback = (funnel: ComebackFigure["funnel"], value: number, aboveGroup = false, words = `words for ${funnel}`): ComebackFigure => ({
  value, lower: 0.2553, upper: 0.3662, successes: null, n: null, note: null, funnel, words, aboveGroup,
});
const row = (key: string, cb: ComebackFigure, o: { peer?: boolean; technicians?: TechnicianRow[] } = {}): ShopBenchmark =>
  ({ key, label: `label ${key}`, peer: o.peer ?? false, comeback: cb, technicians: o.technicians ?? null }) as ShopBenchmark;

describe("visits(rows, groupWide)", () => {
  it("puts visits first, then watches by rate, and leaves out shops within the limits", () => {
    const v = visits([row("A", comeback("above_95", 0.1)), row("B", comeback("within", 0.05)), row("C", comeback("above_998", 0.15)), row("D", comeback("within", 81 / 263, true))], true);
    expect(v.map((x) => [x.key, x.severity])).toEqual([["C", "visit"], ["D", "watch"], ["A", "watch"]]);
    expect(v[0]!.reasons).toEqual(["Comeback rate words for above_998."]);
    expect(v[1]!.reasons).toEqual(["Comeback rate 30.8 %: its 95 % interval (25.5 %–36.6 %) lies above the group rate."]);
  });

  it("names a technician above the group rate", () => {
    const tech: TechnicianRow = { techId: "A-T2", name: "Second", aboveGroup: true, comeback: { value: 81 / 263, lower: 0.2553, upper: 0.3662, successes: 81, n: 263, note: null } };
    const v = visits([row("A", comeback("within", 0.05), { technicians: [tech] })], true);
    expect(v).toEqual([{ key: "A", label: "label A", severity: "watch", reasons: ["Technician A-T2 (Second): 30.8 % of 263 lines came back (95 % interval 25.5 %–36.6 %), above the group rate."] }]);
  });

  it("suggests no visit to a peer for a caller who sees peers", () => {
    const rows = [row("peer-A", comeback("above_998", 0.15), { peer: true })];
    expect(visits(rows, false)).toEqual([]);
    expect(visits(rows, true)).toHaveLength(1);
  });
});
