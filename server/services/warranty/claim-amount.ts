/** A claim's money: which of its repair lines are in the amount claimed, which are listed apart and why. */
import type { ClaimLineSplit } from "../../../shared/schemas/claim-lifecycle.js";

export interface CostedLine {
  id: string;
  partsCost: number | null;
  laborCost: number | null;
  eligibility: { verdict: "covered" | "not_covered" | "unknown"; summary: string };
}

export interface Inclusion {
  reason: string;
  by: string;
  at: string;
}

/** Parts plus labour of one line in whole cents, or null when the line carries no cost. */
export function lineCents(l: Pick<CostedLine, "partsCost" | "laborCost">): number | null {
  const costs = [l.partsCost, l.laborCost].filter((x): x is number => x !== null && Number.isFinite(x));
  return costs.length ? costs.reduce((s, x) => s + Math.round(x * 100), 0) : null;
}

/**
 * The sum of the lines' parts and labour, added in whole cents so that binary fractions do not drift
 * (0.1 + 0.2 is 0.30000000000000004 in IEEE 754 doubles), or null when no line carries a cost.
 */
export function sumMoney(lines: readonly Pick<CostedLine, "partsCost" | "laborCost">[]): number | null {
  const cents = lines.map(lineCents).filter((c): c is number => c !== null);
  return cents.length ? cents.reduce((s, c) => s + c, 0) / 100 : null;
}

const centsToMoney = (c: number | null) => (c === null ? null : c / 100);

/**
 * The amount claimed is the covered lines' parts and labour, plus any line the clerk included deliberately with a
 * reason. A line not covered, or whose coverage cannot be decided, is listed apart with the eligibility's own
 * sentence as the why.
 */
export function splitClaimLines(lines: readonly CostedLine[], inclusions: ReadonlyMap<string, Inclusion>): ClaimLineSplit {
  const included: ClaimLineSplit["included"] = [];
  const apart: ClaimLineSplit["apart"] = [];
  for (const l of lines) {
    const amount = centsToMoney(lineCents(l));
    const inc = inclusions.get(l.id);
    if (l.eligibility.verdict === "covered") {
      included.push({ lineId: l.id, basis: "covered", why: null, reason: inc?.reason ?? null, includedBy: inc?.by ?? null, includedAt: inc?.at ?? null, amount });
    } else if (inc) {
      included.push({ lineId: l.id, basis: "included", why: l.eligibility.summary, reason: inc.reason, includedBy: inc.by, includedAt: inc.at, amount });
    } else {
      apart.push({ lineId: l.id, why: l.eligibility.summary, amount });
    }
  }
  const byId = new Map(lines.map((l) => [l.id, l]));
  return {
    included,
    apart,
    amountClaimed: sumMoney(included.map((x) => byId.get(x.lineId)!)),
    amountApart: sumMoney(apart.map((x) => byId.get(x.lineId)!)),
  };
}
