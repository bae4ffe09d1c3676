/**
 * The comeback funnel: a shop's comeback rate against its volume, around the group rate p₀, with exact binomial
 * limits at 95 % and 99.8 % (Spiegelhalter 2005); its status in words, its point and the curve of the limits.
 */
import { funnelLimits } from "./proportion.js";
import { share } from "./kpis.js";
import { pct, round3, shareFigure } from "./benchmark-figures.js";
import type { Band } from "./benchmark-bands.js";
import type { ShownShop } from "./peer-groups.js";
import type { ComebackCount } from "./comebacks.js";
import { MINIMUM_LINES, type ComebackFigure, type Funnel, type FunnelPoint, type FunnelStatus } from "../../shared/schemas/benchmarks.js";

/** Where x comebacks of n lines fall against the funnel around p0; not rated below MINIMUM_LINES or without a p0 in (0, 1). */
export function funnelStatus(x: number, n: number, p0: number | null): FunnelStatus {
  if (n < MINIMUM_LINES || p0 === null || !(p0 > 0 && p0 < 1)) return "not_rated";
  const l = funnelLimits(p0, n);
  const r = x / n;
  if (r > l.exact998.upper) return "above_998";
  if (r > l.exact95.upper) return "above_95";
  if (r < l.exact998.lower) return "below_998";
  if (r < l.exact95.lower) return "below_95";
  return "within";
}

const STATUS_WORDS: Record<FunnelStatus, string> = {
  above_998: "above the 99.8 % limit: more comebacks than chance explains at this volume",
  above_95: "above the 95 % limit: worth watching",
  within: "within the limits: no different from the group",
  below_95: "below the 95 % limit: fewer comebacks than the group",
  below_998: "below the 99.8 % limit: clearly fewer comebacks than the group",
  not_rated: `fewer than ${MINIMUM_LINES} lines: not rated`,
};

/** Why a shop with enough lines is not rated: there is no group rate to compare with (none given, or 0 or 1). */
export const NO_GROUP_RATE = "not rated: no group rate to compare with";

/**
 * A comeback rate with its funnel status in words and the Wilson flag (lower limit above the group rate). A peer
 * (given with its volume band) gets its rate and band only; a named shop its count and the limit it crossed.
 */
export function comebackFigure(c: ComebackCount, p0: number | null, peerBand: Band | null): ComebackFigure {
  const peer = peerBand !== null;
  const s = share(c.withComeback, c.lines);
  const base = shareFigure(s, peer, "no qualifying repair lines", MINIMUM_LINES);
  const status = funnelStatus(c.withComeback, c.lines, p0);
  let words = status === "not_rated" && c.lines >= MINIMUM_LINES ? NO_GROUP_RATE : STATUS_WORDS[status];
  if (status !== "not_rated" && p0 !== null) {
    const l = funnelLimits(p0, c.lines);
    const limit = status === "above_998" || status === "below_998" ? l.exact998 : l.exact95;
    const edge = status.startsWith("above") ? limit.upper : limit.lower;
    words = peer
      ? `${pct(c.withComeback / c.lines)} is ${STATUS_WORDS[status]} (${peerBand.label})`
      : status === "within"
        ? `${pct(c.withComeback / c.lines)} of ${c.lines} lines is ${STATUS_WORDS[status]} (95 % limits ${pct(l.exact95.lower)}–${pct(l.exact95.upper)})`
        : `${pct(c.withComeback / c.lines)} of ${c.lines} lines is ${STATUS_WORDS[status]} (limit ${pct(edge)})`;
  }
  const aboveGroup = c.lines >= MINIMUM_LINES && p0 !== null && (s.estimate?.lower ?? 0) > p0;
  return { ...base, funnel: status, words, aboveGroup };
}

/**
 * A shop's point on the funnel, or null when it is not plotted (below MINIMUM_LINES, or no group rate). A peer
 * sits at the middle of its volume band, with its rate rounded to 0.1 %.
 */
export function funnelPoint(shop: ShownShop, c: ComebackCount, band: Band, p0: number | null): FunnelPoint | null {
  if (c.lines < MINIMUM_LINES || p0 === null) return null;
  const fig = comebackFigure(c, p0, shop.peer ? band : null);
  return {
    key: shop.key,
    label: shop.label,
    peer: shop.peer,
    lines: shop.peer ? null : c.lines,
    volumeBand: band.label,
    x: shop.peer ? band.mid : c.lines,
    band: shop.peer ? { from: band.from, to: band.to } : null,
    rate: shop.peer ? round3(c.withComeback / c.lines)! : c.withComeback / c.lines,
    status: fig.funnel,
    words: fig.words,
  };
}

/** The funnel's limits around p0 at 61 volumes from MINIMUM_LINES to a tenth past the widest point (none without a p0 in (0, 1)). */
export function funnelCurve(p0: number | null, points: readonly Pick<FunnelPoint, "x" | "band">[]): Funnel["limits"] {
  const maxX = Math.max(MINIMUM_LINES * 2, ...points.map((p) => p.band?.to ?? p.x)) * 1.1;
  const limits: Funnel["limits"] = [];
  if (p0 === null || !(p0 > 0 && p0 < 1)) return limits;
  const steps = 60;
  for (let i = 0; i <= steps; i++) {
    const n = Math.round(MINIMUM_LINES + ((maxX - MINIMUM_LINES) * i) / steps);
    const l = funnelLimits(p0, n);
    limits.push({ n, lower95: l.exact95.lower, upper95: l.exact95.upper, lower998: l.exact998.lower, upper998: l.exact998.upper });
  }
  return limits;
}
