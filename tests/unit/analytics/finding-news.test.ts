import { describe, expect, it } from "vitest";
import { findingNews } from "../../../server/analytics/finding-news.js";
import { findingTrend } from "../../../shared/finding-key.js";
import type { FindingState } from "../../../shared/schemas/findings.js";

// Which findings the Overview calls new or changed is bookkeeping over their dates and trend; the cases are the rules themselves.

const state = (over: Partial<FindingState>): FindingState => ({
  key: "k", status: "new", owner: null, dismissedReason: null, grewSinceDismissed: false, description: "a finding",
  firstSeenAt: "2026-01-01T00:00:00.000Z", changedAt: "2026-01-01T00:00:00.000Z", trend: "new", figuresChangedAt: "2026-01-01T00:00:00.000Z",
  observed: 10, previousObserved: null, ...over,
});
const visit = new Date("2026-02-01T00:00:00Z");

describe("findings new or changed since a moment", () => {
  it("lists a finding found after it as new, and one found before it only when it changed after it", () => {
    const news = findingNews(
      [
        state({ key: "old-quiet" }),
        state({ key: "found-later", firstSeenAt: "2026-02-03T00:00:00.000Z", changedAt: "2026-02-03T00:00:00.000Z", figuresChangedAt: "2026-02-03T00:00:00.000Z" }),
        state({ key: "stronger", trend: "stronger", figuresChangedAt: "2026-02-02T00:00:00.000Z", observed: 14, previousObserved: 10 }),
        state({ key: "worked", status: "investigating", owner: "A. Analyst", changedAt: "2026-02-04T00:00:00.000Z" }),
        state({ key: "moved-unchanged", trend: "unchanged", figuresChangedAt: "2026-02-02T00:00:00.000Z" }),
      ],
      visit,
    );
    expect(news.map((n) => [n.key, n.change])).toEqual([
      ["worked", "worked: now investigating, owner A. Analyst"],
      ["found-later", "new"],
      ["stronger", "stronger after a load (10 → 14 failures)"],
    ]);
  });

  it("leaves a dismissed finding out unless it grew, and lists everything as new on a first visit", () => {
    const dismissed = state({ key: "d", status: "dismissed", changedAt: "2026-02-02T00:00:00.000Z" });
    const grew = state({ key: "g", status: "dismissed", grewSinceDismissed: true, trend: "stronger", figuresChangedAt: "2026-02-05T00:00:00.000Z", observed: 12, previousObserved: 9 });
    expect(findingNews([dismissed, grew], visit).map((n) => [n.key, n.change])).toEqual([["g", "grew since it was dismissed (9 → 12 failures)"]]);
    expect(findingNews([state({ key: "a" }), state({ key: "b" })], null).map((n) => n.change)).toEqual(["new", "new"]);
    // on a first visit a finding worked since it was found says so
    expect(findingNews([state({ key: "w", status: "confirmed", changedAt: "2026-03-01T00:00:00.000Z" })], null).map((n) => n.change)).toEqual(["worked: now confirmed"]);
  });
});

describe("a finding's trend after a load", () => {
  it("is stronger when the lower limit rises by more than 5 %, or failures are added and it holds; weaker when it falls by more than 5 %", () => {
    expect(findingTrend(null, { observed: 5, lower: 2 })).toBe("new");
    expect(findingTrend({ observed: 5, lower: 2 }, { observed: 5, lower: 2.2 })).toBe("stronger");
    expect(findingTrend({ observed: 5, lower: 2 }, { observed: 7, lower: 1.95 })).toBe("stronger");
    expect(findingTrend({ observed: 5, lower: 2 }, { observed: 7, lower: 1.8 })).toBe("weaker");
    expect(findingTrend({ observed: 5, lower: 2 }, { observed: 5, lower: 2.05 })).toBe("unchanged");
  });
});
