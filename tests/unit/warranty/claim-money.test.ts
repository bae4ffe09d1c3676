import { describe, expect, it } from "vitest";
import { bucketOf, bucketTotals, moneyReport, type MoneyClaim } from "../../../server/services/warranty/claim-money.js";

// Invented claims; the expected figures are the sums worked by hand in the comments (common practice, no source).
const claim = (o: Partial<MoneyClaim> & Pick<MoneyClaim, "id" | "status">): MoneyClaim => ({
  previousId: null,
  revision: 1,
  engineFamily: "K18-3G",
  amountClaimed: 1000,
  amountPaid: null,
  amountCredited: null,
  filedOn: "2025-03-10",
  ...o,
});

describe("bucketOf(status, supersededBy)", () => {
  it("puts drafts to file, submitted claims waiting, rejected ones open, and a corrected version's predecessor closed", () => {
    expect(bucketOf("draft", null)).toBe("toFile");
    expect(bucketOf("submitted", null)).toBe("waiting");
    expect(bucketOf("rejected", null)).toBe("rejected");
    expect(bucketOf("rejected", "42")).toBe("closed");
    expect(bucketOf("partly_accepted", null)).toBe("closed");
  });
});

describe("bucketTotals(claims)", () => {
  it("counts each bucket and adds the money at stake in cents", () => {
    const b = bucketTotals([
      { bucket: "toFile", amountClaimed: 0.1 },
      { bucket: "toFile", amountClaimed: 0.2 },
      { bucket: "waiting", amountClaimed: 1500 },
      { bucket: "toFile", amountClaimed: null },
    ]);
    expect(b.toFile).toEqual({ count: 3, amount: 0.3 });
    expect(b.waiting).toEqual({ count: 1, amount: 1500 });
    expect(b.rejected).toEqual({ count: 0, amount: 0 });
  });
});

describe("moneyReport(claims)", () => {
  const claims: MoneyClaim[] = [
    // accepted for less than claimed: 1,000.00 claimed, 900.00 paid, 100.00 written off
    claim({ id: "1", status: "accepted", amountPaid: 900 }),
    // credited: the credit counts as paid (600.00 of 650.00; 50.00 written off)
    claim({ id: "2", status: "credited", amountClaimed: 650, amountPaid: 650, amountCredited: 600, filedOn: "2025-03-28", engineFamily: "K26-4R" }),
    // rejected in April, corrected as version 2 and accepted in full: counts once, as version 2 stands, in April
    claim({ id: "3", status: "rejected", amountClaimed: 400, filedOn: "2025-04-02" }),
    claim({ id: "4", status: "accepted", previousId: "3", revision: 2, amountClaimed: 380, amountPaid: 380, filedOn: "2025-05-01" }),
    // written off: all 250.00
    claim({ id: "5", status: "written_off", amountClaimed: 250, filedOn: "2025-04-15", engineFamily: "K26-4R" }),
    // waiting for the maker: open
    claim({ id: "6", status: "submitted", amountClaimed: 700, filedOn: "2025-04-20" }),
    // a draft never filed: not counted
    claim({ id: "7", status: "draft", filedOn: null }),
  ];

  it("counts a claim with its versions once, by the month it first went out", () => {
    const r = moneyReport(claims);
    expect(r.byMonth).toEqual([
      { key: "2025-03", claims: 2, claimed: 1650, paid: 1500, writtenOff: 150, open: 0 },
      { key: "2025-04", claims: 3, claimed: 1330, paid: 380, writtenOff: 250, open: 700 },
    ]);
    expect(r.byEngineFamily).toEqual([
      { key: "K18-3G", claims: 3, claimed: 2080, paid: 1280, writtenOff: 100, open: 700 },
      { key: "K26-4R", claims: 2, claimed: 900, paid: 600, writtenOff: 300, open: 0 },
    ]);
    expect(r.total).toEqual({ key: "all", claims: 5, claimed: 2980, paid: 1880, writtenOff: 400, open: 700 });
  });

  it("keeps a rejected claim whose correction is still a draft open at the rejected version's amount", () => {
    const r = moneyReport([claim({ id: "1", status: "rejected", amountClaimed: 400 }), claim({ id: "2", status: "draft", previousId: "1", revision: 2, amountClaimed: 380, filedOn: null })]);
    expect(r.total).toEqual({ key: "all", claims: 1, claimed: 400, paid: 0, writtenOff: 0, open: 400 });
  });
});
