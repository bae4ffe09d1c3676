import { describe, expect, it } from "vitest";
import { checkMove, checkSubmit, daysLate, resubmitDeadline, versionDeadline, type SubmitInput } from "../../../server/services/warranty/status.js";

describe("checkMove(from, change)", () => {
  it("allows draft → submitted → accepted → credited", () => {
    expect(checkMove("draft", { to: "submitted" })).toEqual({ ok: true });
    expect(checkMove("submitted", { to: "accepted" })).toEqual({ ok: true });
    expect(checkMove("accepted", { to: "credited", amount: 412.5 })).toEqual({ ok: true });
  });

  it("refuses to credit a draft and names the next step", () => {
    const r = checkMove("draft", { to: "credited", amount: 100 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toBe('A claim in state "Draft" cannot become "Credited"; the next step is to submit it.');
  });

  it("refuses to accept a draft that was never submitted", () => {
    expect(checkMove("draft", { to: "accepted" }).ok).toBe(false);
  });

  it("refuses any move out of a credited or written-off claim", () => {
    expect(checkMove("credited", { to: "accepted" })).toEqual({ ok: false, message: "A claim that is credited is closed: it cannot become accepted by the maker." });
    expect(checkMove("written_off", { to: "submitted" }).ok).toBe(false);
  });

  it("sends a rejected claim to a write-off or a corrected version, never back to submitted", () => {
    const r = checkMove("rejected", { to: "submitted" });
    expect(r).toEqual({ ok: false, message: 'A claim in state "Rejected by the maker" cannot become "Submitted to the maker"; the next step is to write it off, or correct it and resubmit it as a new version.' });
    expect(checkMove("rejected", { to: "written_off" })).toEqual({ ok: false, message: "Writing a claim off needs your reason for not pursuing it." });
    expect(checkMove("rejected", { to: "written_off", reason: "Part was scrapped before the maker asked for it" })).toEqual({ ok: true });
  });

  it("refuses a move back from submitted to draft", () => {
    const r = checkMove("submitted", { to: "draft" });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/record the maker's acceptance, record a partial acceptance or record the maker's rejection/);
  });

  it("refuses a rejection without the maker's reason", () => {
    expect(checkMove("submitted", { to: "rejected", reason: "  " })).toEqual({ ok: false, message: "A rejection needs the maker's reason." });
    expect(checkMove("submitted", { to: "rejected", reason: "Part not returned" })).toEqual({ ok: true });
  });

  it("refuses a credit without a positive amount", () => {
    expect(checkMove("accepted", { to: "credited" }).ok).toBe(false);
    expect(checkMove("accepted", { to: "credited", amount: 0 }).ok).toBe(false);
  });

  it("refuses a move to the state the claim is already in", () => {
    expect(checkMove("submitted", { to: "submitted" })).toEqual({ ok: false, message: "The claim is already submitted to the maker." });
  });
});

describe("checkMove(from, change, claimed) on the maker's answer", () => {
  it("accepts with or without the amount paid, which may differ from the amount claimed", () => {
    expect(checkMove("submitted", { to: "accepted" }, 1200)).toEqual({ ok: true });
    expect(checkMove("submitted", { to: "accepted", amount: 1150.25 }, 1200)).toEqual({ ok: true });
    expect(checkMove("submitted", { to: "accepted", amount: 0 }, 1200).ok).toBe(false);
  });

  it("takes a partial acceptance only with the maker's reason and an amount below the amount claimed", () => {
    expect(checkMove("submitted", { to: "partly_accepted", amount: 800 }, 1200)).toEqual({ ok: false, message: "A partial acceptance needs the maker's reason for what it did not pay." });
    expect(checkMove("submitted", { to: "partly_accepted", reason: "Labour above standard time" }, 1200).ok).toBe(false);
    expect(checkMove("submitted", { to: "partly_accepted", reason: "Labour above standard time", amount: 1200 }, 1200)).toEqual({
      ok: false,
      message: "A partial acceptance pays less than the 1,200.00 claimed; the maker pays 1,200.00, so record an acceptance instead.",
    });
    expect(checkMove("submitted", { to: "partly_accepted", reason: "Labour above standard time", amount: 800 }, 1200)).toEqual({ ok: true });
    expect(checkMove("partly_accepted", { to: "credited", amount: 800 })).toEqual({ ok: true });
  });
});

// Calendar-day differences checked with Python 3's datetime (date(2025, 6, 11) - date(2025, 5, 30) = 12 days;
// date(2024, 3, 1) - date(2024, 2, 28) = 2 days, 2024 being a Gregorian leap year).
describe("daysLate(deadline, filedOn)", () => {
  it("counts calendar days past the deadline, 0 on or before it", () => {
    expect(daysLate("2025-05-30", "2025-06-11")).toBe(12);
    expect(daysLate("2024-02-28", "2024-03-01")).toBe(2);
    expect(daysLate("2025-05-30", "2025-05-30")).toBe(0);
    expect(daysLate("2025-05-30", "2025-05-01")).toBe(0);
  });
});

describe("checkSubmit(input)", () => {
  const base: SubmitInput = { deadline: "2025-05-30", today: "2025-06-11", sentOn: null, pendingSend: false, filing: null, confirmLate: false, closedDate: "2025-04-30" };

  it("refuses a claim that never went out, in words", () => {
    const r = checkSubmit(base);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.code).toBe("not_sent");
      expect(r.message).toMatch(/has not gone to the maker: send the packet from here, or record how it went out/);
    }
    const pending = checkSubmit({ ...base, pendingSend: true });
    if (!pending.ok) expect(pending.message).toMatch(/still waiting to go/);
  });

  it("refuses a late filing without confirmation, stating the days overdue", () => {
    const r = checkSubmit({ ...base, filing: { reference: "PORTAL-7781", filedOn: "2025-06-11" } });
    expect(r).toEqual({
      ok: false,
      code: "late_unconfirmed",
      daysLate: 12,
      message: "Filed on 2025-06-11, the claim is 12 days past its deadline of 2025-05-30, and the maker may refuse it as late. Confirm the late filing to submit it anyway.",
    });
    expect(checkSubmit({ ...base, filing: { reference: "PORTAL-7781", filedOn: "2025-06-11" }, confirmLate: true })).toEqual({ ok: true, via: "other", reference: "PORTAL-7781", filedOn: "2025-06-11", daysLate: 12 });
  });

  it("judges lateness by the day the claim went out, not the day it is recorded", () => {
    expect(checkSubmit({ ...base, filing: { reference: "PORTAL-7781", filedOn: "2025-05-29" } })).toEqual({ ok: true, via: "other", reference: "PORTAL-7781", filedOn: "2025-05-29", daysLate: 0 });
    expect(checkSubmit({ ...base, sentOn: "2025-05-30" })).toEqual({ ok: true, via: "mail", reference: null, filedOn: "2025-05-30", daysLate: 0 });
  });

  it("refuses a filing date after today or before the repair order closed", () => {
    expect(checkSubmit({ ...base, filing: { reference: "X1", filedOn: "2025-06-12" } })).toMatchObject({ ok: false, code: "bad_filing_date" });
    expect(checkSubmit({ ...base, filing: { reference: "X1", filedOn: "2025-04-29" } })).toMatchObject({ ok: false, code: "bad_filing_date" });
  });
});

// 2025-06-10 + 30 days = 2025-07-10 (Python 3: date(2025, 6, 10) + timedelta(30)).
describe("resubmitDeadline(rejectedOn, claimDays, firstDeadline)", () => {
  it("gives the claim days again from the rejection, never earlier than the first deadline", () => {
    expect(resubmitDeadline("2025-06-10", 30, "2025-05-30")).toBe("2025-07-10");
    expect(resubmitDeadline("2024-12-20", 30, "2025-02-01")).toBe("2025-02-01");
  });

  it("states the arithmetic and the days left", () => {
    const d = versionDeadline("2025-06-10", 30, "2025-05-30", "2025-07-01");
    expect(d).toMatchObject({ deadline: "2025-07-10", daysLeft: 9, state: "open" });
    expect(d.text).toBe("Corrected version: rejection recorded 2025-06-10 + 30 days = deadline 2025-07-10; 9 days left.");
  });
});
