/**
 * Label positions that do not pile up: each label starts at its point's y and overlapping labels (closer than
 * `gap` in y while their points are within `nearX` in x) are pushed apart symmetrically, pair by pair, until none
 * overlap (a one-dimensional relaxation, as force-directed label placement does), inside `bounds` (the plot's
 * y domain). Pure: data units in, out.
 */
export function spreadLabels(points: readonly { x: number; y: number }[], gap: number, nearX: number, bounds: readonly [number, number] = [-Infinity, Infinity], rounds = 400): number[] {
  const [lo, hi] = bounds;
  const clamp = (y: number) => Math.min(hi, Math.max(lo, y));
  const ys = points.map((p) => clamp(p.y));
  // ties are broken by input order, so two labels at the same y move apart the same way every time
  const order = points.map((_, i) => i).sort((a, b) => points[a]!.y - points[b]!.y || a - b);
  for (let r = 0; r < rounds; r++) {
    let moved = false;
    for (let a = 0; a < order.length; a++) {
      for (let b = a + 1; b < order.length; b++) {
        const i = order[a]!;
        const j = order[b]!;
        if (Math.abs(points[i]!.x - points[j]!.x) >= nearX) continue;
        const d = ys[j]! - ys[i]!;
        if (Math.abs(d) >= gap - 1e-9) continue;
        const push = (gap - Math.abs(d)) / 2;
        // the lower of the pair (by input y order) goes down, the other up
        // a label held at a bound stays there and the other one moves the whole way, over the next rounds
        ys[i] = clamp(ys[i]! - push);
        ys[j] = clamp(ys[j]! + push);
        moved = true;
      }
    }
    if (!moved) break;
  }
  return ys;
}
