import { describe, expect, it } from "vitest";
import { comebackFigure, funnelCurve, funnelPoint, funnelStatus } from "../../../server/analytics/benchmark-funnel.js";
import { volumeBand } from "../../../server/analytics/benchmark-bands.js";
import type { ShownShop } from "../../../server/analytics/peer-groups.js";
import { expectNear } from "./fixtures/tolerance.js";

// Funnel limits: Spiegelhalter (2005), Statistics in Medicine 24:1185–1202, exact binomial with interpolation;
// values for target 8 % from REFERENCE.md case H (library cross-check): n = 100 → 95 % 0.0254–0.13217,
// 99.8 % 0.00366–0.16953; n = 250 → 95 % 0.04586–0.11327, 99.8 % 0.0299–0.13554. Wilson: Newcombe (1998)
// Table I, 81/263 → lower 0.2553. Not rating below 30 lines is DOMAIN.md §3 (common practice, no source).

describe("funnelStatus(x, n, p0)", () => {
  it("places a rate against the 95 % and 99.8 % limits at its volume", () => {
    expect(funnelStatus(17, 100, 0.08)).toBe("above_998"); // 0.17 > 0.16953
    expect(funnelStatus(14, 100, 0.08)).toBe("above_95"); // 0.13217 < 0.14 ≤ 0.16953
    expect(funnelStatus(8, 100, 0.08)).toBe("within");
    expect(funnelStatus(2, 100, 0.08)).toBe("below_95"); // 0.00366 ≤ 0.02 < 0.0254
    expect(funnelStatus(0, 100, 0.08)).toBe("below_998"); // 0 < 0.00366
  });

  it("does not rate fewer than 30 lines or a group rate of 0, 1 or none", () => {
    expect(funnelStatus(20, 29, 0.08)).toBe("not_rated");
    for (const p0 of [null, 0, 1]) expect(funnelStatus(8, 100, p0)).toBe("not_rated");
  });
});

describe("comebackFigure(count, p0, peerBand)", () => {
  it("gives a named shop the limit it crossed, or the 95 % limits when within", () => {
    expect(comebackFigure({ lines: 100, withComeback: 17 }, 0.08, null)).toMatchObject({
      value: 0.17, n: 100, funnel: "above_998",
      words: "17.0 % of 100 lines is above the 99.8 % limit: more comebacks than chance explains at this volume (limit 17.0 %)",
    });
    expect(comebackFigure({ lines: 100, withComeback: 8 }, 0.08, null).words).toBe("8.0 % of 100 lines is within the limits: no different from the group (95 % limits 2.5 %–13.2 %)");
  });

  it("gives a peer its rate and band only", () => {
    const f = comebackFigure({ lines: 100, withComeback: 14 }, 0.08, volumeBand(100));
    expect(f).toMatchObject({ value: 0.14, n: null, lower: null, funnel: "above_95", words: "14.0 % is above the 95 % limit: worth watching (100–299 lines)" });
  });

  it("flags a rate whose Wilson lower limit is above the group rate", () => {
    expect(comebackFigure({ lines: 263, withComeback: 81 }, 0.2, null).aboveGroup).toBe(true); // 0.2553 > 0.20
    expect(comebackFigure({ lines: 263, withComeback: 81 }, 0.3, null).aboveGroup).toBe(false); // 0.2553 < 0.30
    expect(comebackFigure({ lines: 29, withComeback: 20 }, 0.08, null)).toMatchObject({ funnel: "not_rated", words: "fewer than 30 lines: not rated", aboveGroup: false });
  });
});

describe("funnelPoint(shop, count, band, p0)", () => {
  const named: ShownShop = { code: "S1", name: "One", key: "S1", label: "S1 One", peer: false };
  const peer: ShownShop = { code: "S2", name: "Two", key: "peer-A", label: "Peer A", peer: true };

  it("plots a named shop at its lines and a peer at the middle of its band, its rate rounded", () => {
    expect(funnelPoint(named, { lines: 263, withComeback: 81 }, volumeBand(263), 0.2)).toMatchObject({ x: 263, lines: 263, band: null, rate: 81 / 263 });
    expect(funnelPoint(peer, { lines: 263, withComeback: 81 }, volumeBand(263), 0.2)).toMatchObject({ x: 200, lines: null, band: { from: 100, to: 299 }, rate: 0.308, volumeBand: "100–299 lines" });
  });

  it("does not plot fewer than 30 lines or without a group rate", () => {
    expect(funnelPoint(named, { lines: 29, withComeback: 1 }, volumeBand(29), 0.2)).toBeNull();
    expect(funnelPoint(named, { lines: 100, withComeback: 1 }, volumeBand(100), null)).toBeNull();
  });
});

describe("funnelCurve(p0, points)", () => {
  it("draws 61 limits from 30 lines to a tenth past the widest point, at Spiegelhalter's exact limits", () => {
    // widest point 300 lines → up to 330, in steps of 5: 30, 35, …, 330
    const shop = funnelPoint({ code: "S1", name: "One", key: "S1", label: "S1 One", peer: false }, { lines: 300, withComeback: 24 }, volumeBand(300), 0.08)!;
    const curve = funnelCurve(0.08, [shop]);
    expect(curve).toHaveLength(61);
    expect([curve[0]!.n, curve[1]!.n, curve[60]!.n]).toEqual([30, 35, 330]);
    const at = (n: number) => curve.find((l) => l.n === n)!;
    for (const [n, lower95, upper95, lower998, upper998] of [[100, 0.0254, 0.13217, 0.00366, 0.16953], [250, 0.04586, 0.11327, 0.0299, 0.13554]] as const) {
      expectNear(at(n).lower95, lower95, 0, 5);
      expectNear(at(n).upper95, upper95, 0, 5);
      expectNear(at(n).lower998, lower998, 0, 5);
      expectNear(at(n).upper998, upper998, 0, 5);
    }
  });

  it("draws no limits without a group rate in (0, 1)", () => {
    expect(funnelCurve(null, [])).toEqual([]);
    expect(funnelCurve(0, [])).toEqual([]);
  });
});
