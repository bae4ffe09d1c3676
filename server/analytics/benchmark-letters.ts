/**
 * Letters that stand for anonymised peers: A … Z, then AA, AB, … (as spreadsheet columns are named), given in
 * the order of a rank key per shop. The key (a keyed hash in the benchmarks service) decides the shuffle.
 */

/** The letter of the i-th peer (0 → A, 25 → Z, 26 → AA). */
export const peerLetter = (i: number): string => (i < 26 ? String.fromCharCode(65 + i) : peerLetter(Math.floor(i / 26) - 1) + String.fromCharCode(65 + (i % 26)));

/** Letters by ascending rank key: shop code → letter. */
export function lettersByRank(ranked: readonly (readonly [code: string, rankKey: string])[]): Map<string, string> {
  const sorted = [...ranked].sort((a, b) => (a[1] < b[1] ? -1 : 1));
  return new Map(sorted.map(([code], i) => [code, peerLetter(i)]));
}

/** A shop as one caller sees it: by code and name, or as a lettered peer. */
export interface ShownShop {
  code: string;
  name: string;
  /** the shop code, or "peer-B" */
  key: string;
  /** "S1 Name", or "Peer B" */
  label: string;
  peer: boolean;
}

/** Shops in the order a caller sees them: named shops by code, then peers (the shops with a letter) by letter. */
export function shownShops(shops: readonly { code: string; name: string }[], letters: ReadonlyMap<string, string>): ShownShop[] {
  const shown = shops.map((s): ShownShop => {
    const l = letters.get(s.code);
    return l === undefined ? { code: s.code, name: s.name, key: s.code, label: `${s.code} ${s.name}`, peer: false } : { code: s.code, name: s.name, key: `peer-${l}`, label: `Peer ${l}`, peer: true };
  });
  return shown.sort((a, b) => (a.peer !== b.peer ? (a.peer ? 1 : -1) : a.key < b.key ? -1 : 1));
}
