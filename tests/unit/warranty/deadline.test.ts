import { describe, expect, it } from "vitest";
import { compareByDeadline, filingDeadline } from "../../../server/services/warranty/deadline.js";

describe("filingDeadline(closed, days, today)", () => {
  // RO closed 2025-01-20; 2025-01-20 + 30 days = 2025-02-19 (11 days left in January + 19 in February)
  it("counts the days left to the deadline", () => {
    const d = filingDeadline("2025-01-20", 30, "2025-02-01");
    expect(d.deadline).toBe("2025-02-19");
    // 2025-02-01 → 2025-02-19 is 18 days
    expect(d.daysLeft).toBe(18);
    expect(d.state).toBe("open");
    expect(d.text).toBe("RO closed 2025-01-20 + 30 days = deadline 2025-02-19; 18 days left.");
  });

  it("says a claim is due on the deadline day", () => {
    const d = filingDeadline("2025-01-20", 30, "2025-02-19");
    expect(d.daysLeft).toBe(0);
    expect(d.state).toBe("due_today");
  });

  it("counts overdue days after the deadline", () => {
    const d = filingDeadline("2025-01-20", 30, "2025-02-22");
    expect(d.daysLeft).toBe(-3);
    expect(d.text).toMatch(/overdue by 3 days/);
  });

  it("crosses a leap day: 2024-02-15 + 30 days = 2024-03-16", () => {
    expect(filingDeadline("2024-02-15", 30, "2024-02-15").deadline).toBe("2024-03-16");
  });

  it("takes the engine family's own claim days", () => {
    // 2025-03-01 + 60 days = 2025-04-30 (30 left in March + 30 in April)
    expect(filingDeadline("2025-03-01", 60, "2025-03-01").deadline).toBe("2025-04-30");
  });
});

describe("compareByDeadline(a, b)", () => {
  it("lists the nearest open deadline first and overdue claims after them, least overdue first", () => {
    const rows = [{ daysLeft: -40 }, { daysLeft: 12 }, { daysLeft: -2 }, { daysLeft: 0 }, { daysLeft: 3 }];
    expect(rows.sort(compareByDeadline).map((r) => r.daysLeft)).toEqual([0, 3, 12, -2, -40]);
  });
});
