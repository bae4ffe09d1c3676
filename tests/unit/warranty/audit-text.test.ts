import { describe, expect, it } from "vitest";
import { auditSentence } from "../../../server/services/warranty/audit-text.js";

describe("auditSentence(action, changes)", () => {
  it("tells a late submission with the days and the confirmation", () => {
    expect(auditSentence("status", { status: { from: "draft", to: "submitted" }, via: "other", reference: "PORTAL-7781", filedOn: "2025-06-11", daysLate: 12, deadline: "2025-05-30", amountClaimed: 26842.53 })).toBe(
      "Marked submitted: the claim went to the maker by another way on 2025-06-11, reference PORTAL-7781, for 26,842.53. It went 12 days after the deadline of 2025-05-30; the late filing was confirmed.",
    );
  });

  it("tells a deliberate inclusion with why and the reason", () => {
    expect(
      auditSentence("line included", { line: "RO 1001/2 at S3 (serial X1)", why: "Not covered: the hours limit was passed (engine cover).", reason: "Same failed lot.", amountClaimed: 27240.1 }),
    ).toBe("Included repair line RO 1001/2 at S3 (serial X1) in the amount claimed although not covered: the hours limit was passed (engine cover). Reason: Same failed lot. The amount claimed is now 27,240.10.");
  });

  it("tells the maker's answers", () => {
    expect(auditSentence("status", { status: { from: "submitted", to: "accepted" }, amountPaid: 900, amountClaimed: 1000 })).toBe("Recorded the maker's acceptance: 900.00 paid of 1,000.00 claimed.");
    expect(auditSentence("status", { status: { from: "submitted", to: "rejected" }, reason: "Part not returned." })).toBe("Recorded the maker's rejection. The maker's reason: Part not returned.");
  });

  it("tells an action it does not know as its changes in words", () => {
    expect(auditSentence("price checked", { words: 12 })).toBe("Price checked: words 12.");
  });

  it("tells the story's changes: the narrative's parts, a note and who it is for, a removed attachment", () => {
    expect(auditSentence("narrative edited", { parts: ["what was found", "why it is the maker's"] })).toBe("Edited the narrative: what was found and why it is the maker's.");
    expect(auditSentence("narrative edited", { parts: ["what was done"] })).toBe("Edited the narrative: what was done.");
    expect(auditSentence("note added", { by: "shop" })).toBe("Added a note for the clerk (from the shop).");
    expect(auditSentence("attachment removed", { attachment: "wrong-machine.png" })).toBe("Removed the attachment wrong-machine.png before sending.");
  });
});
