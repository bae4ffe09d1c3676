import { describe, expect, it } from "vitest";
import { spreadLabels } from "../../../src/features/benchmarks/charts/label-spread.js";

// The property is geometric (no two labels of near points closer than the gap); the symmetric push is the
// one-dimensional case of force-directed label placement (common practice, no source).

const overlaps = (pts: { x: number; y: number }[], ys: number[], gap: number, nearX: number) =>
  pts.flatMap((p, i) => pts.map((q, j) => (i < j && Math.abs(p.x - q.x) < nearX && Math.abs(ys[i]! - ys[j]!) < gap - 1e-6 ? [i, j] : null))).filter(Boolean);

describe("spreadLabels(points, gap, nearX)", () => {
  it("leaves labels that do not overlap where they are", () => {
    const pts = [{ x: 10, y: 1 }, { x: 10, y: 5 }, { x: 500, y: 1.1 }];
    expect(spreadLabels(pts, 2, 50)).toEqual([1, 5, 1.1]);
  });

  it("pushes two labels at the same place apart by the gap, around their point", () => {
    const ys = spreadLabels([{ x: 100, y: 4 }, { x: 105, y: 4 }], 1, 50);
    expect(Math.abs(ys[0]! - ys[1]!)).toBeCloseTo(1, 9);
    expect((ys[0]! + ys[1]!) / 2).toBeCloseTo(4, 9);
  });

  it("separates a pile of eight labels so that no two near points' labels overlap", () => {
    const pts = Array.from({ length: 8 }, (_, i) => ({ x: 200 + 3 * i, y: 10 + 0.05 * ((i * 5) % 8) }));
    const ys = spreadLabels(pts, 0.8, 40);
    expect(overlaps(pts, ys, 0.8, 40)).toEqual([]);
    // the order of the labels follows the order of their points
    const byPoint = pts.map((_, i) => i).sort((a, b) => pts[a]!.y - pts[b]!.y || a - b);
    const byLabel = pts.map((_, i) => i).sort((a, b) => ys[a]! - ys[b]!);
    expect(byLabel).toEqual(byPoint);
  });

  it("keeps the labels inside the bounds, moving the others the whole way from a label held at a bound", () => {
    const pts = [{ x: 1, y: 99.5 }, { x: 2, y: 99.8 }, { x: 3, y: 99.9 }];
    const ys = spreadLabels(pts, 1, 40, [0, 100]);
    expect(ys.every((y) => y >= 0 && y <= 100)).toBe(true);
    expect(overlaps(pts, ys, 1, 40)).toEqual([]);
  });
});
