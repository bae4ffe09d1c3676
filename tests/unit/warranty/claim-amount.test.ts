import { describe, expect, it } from "vitest";
import { splitClaimLines, sumMoney, type CostedLine } from "../../../server/services/warranty/claim-amount.js";

const covered = { verdict: "covered" as const, summary: "Covered: inside both limits (engine cover, 36 months / 3,000 h, whichever comes first)." };
const overHours = { verdict: "not_covered" as const, summary: "Not covered: the hours limit was passed (engine cover, 36 months / 3,000 h, whichever comes first)." };
const unknown = { verdict: "unknown" as const, summary: "Cannot be decided: the hour meter is missing (engine cover, 36 months / 3,000 h, whichever comes first); the claim is at risk." };

const lines: CostedLine[] = [
  { id: "1", partsCost: 0.1, laborCost: 0.2, eligibility: covered },
  { id: "2", partsCost: 120.45, laborCost: 88, eligibility: covered },
  { id: "3", partsCost: 310, laborCost: 95.5, eligibility: overHours },
  { id: "4", partsCost: null, laborCost: 40, eligibility: unknown },
  { id: "5", partsCost: null, laborCost: null, eligibility: covered },
];

describe("sumMoney(lines)", () => {
  // IEEE 754 binary64: 0.1 + 0.2 = 0.30000000000000004; summed in whole cents it is 0.30 exactly
  it("adds parts and labour in whole cents", () => {
    expect(0.1 + 0.2).not.toBe(0.3);
    expect(sumMoney([{ partsCost: 0.1, laborCost: 0.2 }])).toBe(0.3);
  });

  it("is null when no line carries a cost", () => {
    expect(sumMoney([{ partsCost: null, laborCost: null }])).toBeNull();
    expect(sumMoney([])).toBeNull();
  });
});

describe("splitClaimLines(lines, inclusions)", () => {
  it("claims the covered lines only and lists the others apart with the eligibility's sentence", () => {
    const s = splitClaimLines(lines, new Map());
    expect(s.included.map((x) => x.lineId)).toEqual(["1", "2", "5"]);
    // 0.30 + 208.45 (the fifth line has no cost)
    expect(s.amountClaimed).toBe(208.75);
    expect(s.apart).toEqual([
      { lineId: "3", why: overHours.summary, amount: 405.5 },
      { lineId: "4", why: unknown.summary, amount: 40 },
    ]);
    expect(s.amountApart).toBe(445.5);
  });

  it("claims a line included deliberately, keeping why it is not covered and the clerk's reason", () => {
    const s = splitClaimLines(lines, new Map([["3", { reason: "Same failed lot as the covered lines", by: "A Clerk", at: "2025-06-01T10:00:00.000Z" }]]));
    expect(s.amountClaimed).toBe(614.25);
    expect(s.included.find((x) => x.lineId === "3")).toEqual({
      lineId: "3",
      basis: "included",
      why: overHours.summary,
      reason: "Same failed lot as the covered lines",
      includedBy: "A Clerk",
      includedAt: "2025-06-01T10:00:00.000Z",
      amount: 405.5,
    });
    expect(s.apart.map((x) => x.lineId)).toEqual(["4"]);
  });
});
