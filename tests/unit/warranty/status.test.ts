import { describe, expect, it } from "vitest";
import { checkMove } from "../../../server/services/warranty/status.js";

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

  it("refuses any move out of a rejected or credited claim", () => {
    const r = checkMove("rejected", { to: "submitted" });
    expect(r).toEqual({ ok: false, message: "A claim that is rejected by the maker is closed: it cannot become submitted to the maker." });
    expect(checkMove("credited", { to: "accepted" }).ok).toBe(false);
  });

  it("refuses a move back from submitted to draft", () => {
    const r = checkMove("submitted", { to: "draft" });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/record the maker's acceptance or record the maker's rejection/);
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
