/**
 * Volume bands shown for an anonymised peer instead of its exact line count: coarse steps of about ×3, merged so
 * that no band holds a single peer.
 */

const BAND_EDGES = [30, 100, 300, 1000, 3000, 10000, 30000, 100000];

/** A coarse volume band (about ×3 steps), shown for a peer instead of its exact line count. */
export interface Band {
  label: string;
  mid: number;
  from: number;
  to: number;
}

const bandIndex = (n: number): number => {
  let i = -1;
  while (i + 1 < BAND_EDGES.length && n >= BAND_EDGES[i + 1]!) i++;
  return i;
};
const bandEdge = (i: number): number => (i < 0 ? 0 : BAND_EDGES[i]!);
const bandTop = (i: number): number => (i + 1 < BAND_EDGES.length ? BAND_EDGES[i + 1]! - 1 : BAND_EDGES[BAND_EDGES.length - 1]!);

/**
 * Volume bands for a set of peers such that no band holds a single peer (when there are two or more): a peer
 * alone in its band would be recognisable as the group's busiest or quietest shop, so its band is merged with
 * the nearest band that holds other peers.
 */
export function peerBands(lines: readonly number[]): Band[] {
  let groups = [...new Set(lines.map(bandIndex))].sort((a, b) => a - b).map((i) => ({ lo: i, hi: i }));
  const members = (g: { lo: number; hi: number }) => lines.filter((n) => bandIndex(n) >= g.lo && bandIndex(n) <= g.hi).length;
  for (let lonely = groups.findIndex((g) => members(g) === 1); lonely >= 0 && groups.length > 1; lonely = groups.findIndex((g) => members(g) === 1)) {
    const g = groups[lonely]!;
    const prev = groups[lonely - 1];
    const next = groups[lonely + 1];
    const intoPrev = next === undefined || (prev !== undefined && g.lo - prev.hi <= next.lo - g.hi);
    const other = intoPrev ? prev! : next!;
    const merged = { lo: Math.min(g.lo, other.lo), hi: Math.max(g.hi, other.hi) };
    groups = groups.filter((x) => x !== g && x !== other).concat(merged).sort((a, b) => a.lo - b.lo);
  }
  return lines.map((n) => {
    const i = bandIndex(n);
    const g = groups.find((x) => i >= x.lo && i <= x.hi)!;
    const from = bandEdge(g.lo);
    const to = bandTop(g.hi);
    const label = from === 0 ? `under ${(to + 1).toLocaleString("en-US")} lines` : g.hi === BAND_EDGES.length - 1 ? `${from.toLocaleString("en-US")} lines or more` : `${from.toLocaleString("en-US")}–${to.toLocaleString("en-US")} lines`;
    return { label, mid: (from + to + 1) / 2, from, to };
  });
}

/** The band of one shop's own volume, never merged (for the shops a caller may name). */
export const volumeBand = (lines: number): Band => peerBands([lines])[0]!;

/** Bands by shop code: each named shop's own band, and the peers' bands merged so that no peer stands alone. */
export function shopBands(named: readonly (readonly [code: string, lines: number])[], peers: readonly (readonly [code: string, lines: number])[]): Map<string, Band> {
  const bands = new Map<string, Band>(named.map(([code, lines]) => [code, volumeBand(lines)]));
  const merged = peerBands(peers.map(([, lines]) => lines));
  peers.forEach(([code], i) => bands.set(code, merged[i]!));
  return bands;
}
