import { describe, expect, it } from "vitest";
import { buildFindings } from "../../../server/services/digest/sections/findings.js";
import { buildFlaggedShops, flaggedShopsSection } from "../../../server/services/digest/sections/flagged-shops.js";
import { buildShopPosition, shopPositionSection } from "../../../server/services/digest/sections/shop-position.js";
import { buildDeadlines, deadlinesSection, type DeadlinesData } from "../../../server/services/digest/sections/deadlines.js";
import { findingsSection } from "../../../server/services/digest/sections/findings.js";
import { digestSections } from "../../../server/services/digest/sections.js";
import { buildWinter, winterSection } from "../../../server/services/digest/sections/winter.js";
import { createFormat } from "../../../shared/format.js";
import type { FindingState } from "../../../shared/schemas/findings.js";
import type { ShopBenchmarks } from "../../../shared/schemas/benchmarks.js";
import type { DigestReader } from "../../../server/services/digest/section.js";

const tools = { link: (p: string) => `https://ironledger.invalid${p}`, format: createFormat({ locale: "en-US", currency: "USD" }) };

const finding = (key: string, at: { first: string; changed: string; figures?: string }, more: Partial<FindingState> = {}): FindingState => ({
  key,
  status: "new",
  owner: null,
  dismissedReason: null,
  grewSinceDismissed: false,
  description: `Finding ${key}.`,
  firstSeenAt: at.first,
  changedAt: at.changed,
  trend: "unchanged",
  figuresChangedAt: at.figures ?? at.first,
  observed: 10,
  previousObserved: null,
  ...more,
});

describe("buildFindings({states, since}, tools)", () => {
  const since = "2025-07-07T06:00:00.000Z";
  it("lists findings found after `since` as new and those worked or moved after it as changed, with their state", () => {
    const s = buildFindings(
      {
        since,
        states: [
          finding("old", { first: "2025-06-01T00:00:00Z", changed: "2025-06-01T00:00:00Z" }),
          finding("worked", { first: "2025-06-01T00:00:00Z", changed: "2025-07-08T09:00:00Z" }, { status: "investigating", owner: "A. Analyst" }),
          finding("moved", { first: "2025-06-01T00:00:00Z", changed: "2025-06-01T00:00:00Z", figures: "2025-07-09T09:00:00Z" }, { trend: "stronger", previousObserved: 8, observed: 12 }),
          finding("fresh", { first: "2025-07-10T00:00:00Z", changed: "2025-07-10T00:00:00Z" }),
          // exactly at `since` is not after it
          finding("edge", { first: since, changed: since }),
        ],
      },
      tools,
    );
    expect(s.lines).toEqual([
      "New (status new): Finding fresh.",
      "Changed (status new, stronger after the last load (8 → 12 failures)): Finding moved.",
      "Changed (status investigating, owner A. Analyst): Finding worked.",
    ]);
    expect(s.links).toEqual([{ label: "Open the findings", url: "https://ironledger.invalid/clusters" }]);
  });

  it("says so when nothing changed, and caps a long list with the count of the rest", () => {
    expect(buildFindings({ since, states: [] }, tools).lines).toEqual(["No finding was found or changed since your last digest."]);
    const many = Array.from({ length: 15 }, (_, i) => finding(`f${i}`, { first: "2025-07-10T00:00:00Z", changed: "2025-07-10T00:00:00Z" }));
    const lines = buildFindings({ since, states: many }, tools).lines;
    expect(lines).toHaveLength(13);
    expect(lines.at(-1)).toBe("… and 3 more findings on the page.");
  });
});

const share = (value: number | null) => ({ value, lower: null, upper: null, successes: null, n: null, note: null });
const row = (code: string, funnel: string, rate: number, words: string, efficiency: number | null = null) => ({
  key: code,
  label: `${code} Shop ${code}`,
  peer: false,
  shopCode: code,
  name: `Shop ${code}`,
  lines: 300,
  volumeBand: "250–499",
  comeback: { ...share(rate), funnel, words, aboveGroup: false },
  efficiency: { value: efficiency, standardHours: null, actualHours: null, lines: null, note: null },
});
const benchmarks = (shops: object[], more: object = {}) =>
  ({
    period: { label: "12 months to May 2025" },
    group: { comeback: share(0.075), efficiency: { value: 1.002 } },
    groupHidden: null,
    shops,
    peers: null,
    ...more,
  }) as unknown as ShopBenchmarks;

// A funnel plot flags a unit whose rate lies outside the control limits around the group's rate
// (Spiegelhalter, "Funnel plots for comparing institutional performance", Statistics in Medicine 2005; from memory).
describe("buildFlaggedShops(benchmarks, tools)", () => {
  it("lists the shops outside the 95 % limits, those above before those below, and leaves the rest out", () => {
    const s = buildFlaggedShops(
      benchmarks([
        row("S4", "below_95", 0.041, "below the 95 % limit"),
        row("S2", "within", 0.07, "within the limits"),
        row("S5", "above_998", 0.158, "above the 99.8 % limit"),
        row("S7", "not_rated", 0.2, "not rated: fewer than 30 lines"),
        row("S1", "above_95", 0.11, "above the 95 % limit"),
      ]),
      tools,
    );
    expect(s.title).toBe("Shops outside their benchmark limits (12 months to May 2025)");
    expect(s.lines).toEqual([
      "S5 Shop S5: comebacks 15.8% against the group's 7.5%, above the 99.8 % limit.",
      "S1 Shop S1: comebacks 11.0% against the group's 7.5%, above the 95 % limit.",
      "S4 Shop S4: comebacks 4.1% against the group's 7.5%, below the 95 % limit.",
    ]);
  });

  it("says every rated shop is inside the limits when none is outside", () => {
    expect(buildFlaggedShops(benchmarks([row("S2", "within", 0.07, "within")]), tools).lines).toEqual(["Every rated shop's comeback rate is inside the 95 % limits around the group's 7.5%."]);
  });
});

describe("buildShopPosition(benchmarks, tools)", () => {
  it("gives the manager's own shops against the group and the other shops only as the peer summary words", () => {
    const b = benchmarks([row("S3", "within", 0.076, "within the limits", 1.112)], {
      peers: { shops: 7, comeback: { words: "3 below 6 % · 4 at 6 % or more" } },
    });
    expect(buildShopPosition(b, tools).lines).toEqual([
      "S3 Shop S3: comebacks 7.6% against the group's 7.5%, within the limits; labour efficiency 111.2% against the group's 100.2%.",
      "The other 7 shops' comeback rates: 3 below 6 % · 4 at 6 % or more",
    ]);
  });

  it("leaves the group's figures out when the benchmarks hide them from the caller, and says why", () => {
    const b = benchmarks([row("S3", "within", 0.076, "within the limits")], { group: null, groupHidden: "The group's figures are hidden: too few other shops." });
    expect(buildShopPosition(b, tools).lines).toEqual(["S3 Shop S3: comebacks 7.6%, within the limits.", "The group's figures are hidden: too few other shops."]);
  });
});

describe("buildDeadlines(data, tools)", () => {
  const data: DeadlinesData = {
    canOpenClaims: true,
    groupWide: false,
    drafts: [
      { id: "7", claimNumber: "WC-7", title: "Heater plugs", shopCode: "S3", deadline: "2025-07-20", daysLeft: 13 },
      { id: "5", claimNumber: "WC-5", title: "Starter", shopCode: "S3", deadline: "2025-07-07", daysLeft: 0 },
    ],
    lineCount: 1,
    nearestLines: [{ id: "9", roNumber: "304987", lineNo: 1, shopCode: "S3", deadline: "2025-07-08", daysLeft: 1 }],
  };
  it("lists draft claims nearest first and the nearest unclaimed lines, each claim linked to its page", () => {
    const s = buildDeadlines(data, tools);
    expect(s.lines).toEqual([
      "2 draft claims and 1 unclaimed repair line inside cover reach their filing deadline in the next 14 days.",
      "Claim WC-5 (S3): Starter, deadline 2025-07-07, due today.",
      "Claim WC-7 (S3): Heater plugs, deadline 2025-07-20, 13 days left.",
      "Repair order 304987 line 1 (S3): not claimed, deadline 2025-07-08, 1 day left.",
    ]);
    expect(s.links.map((l) => l.url)).toEqual(["https://ironledger.invalid/claims/5", "https://ironledger.invalid/claims/7", "https://ironledger.invalid/claims"]);
  });

  it("gives a reader who may not open the claims pages the counts only, with no link", () => {
    const s = buildDeadlines({ ...data, canOpenClaims: false, groupWide: true }, tools);
    expect(s.title).toBe("Claims and lines due in the next 14 days (group-wide)");
    expect(s.lines).toHaveLength(1);
    expect(s.links).toEqual([]);
  });
});

describe("digestSections", () => {
  const reader = (roles: DigestReader["roles"], scope: DigestReader["scope"]): DigestReader => ({ sub: "u", name: "U", roles, scope });
  const keys = (r: DigestReader) => digestSections.filter((s) => s.appliesTo(r)).map((s) => s.key);
  it("gives each role only the sections its pages show it", () => {
    expect(keys(reader(["analyst"], { kind: "all" }))).toEqual(["findings", "flagged-shops", "winter"]);
    expect(keys(reader(["director"], { kind: "all" }))).toEqual(["findings", "flagged-shops", "winter", "deadlines"]);
    expect(keys(reader(["manager"], { kind: "shops", shops: ["S3"] }))).toEqual(["shop-position", "winter", "deadlines"]);
    expect(keys(reader(["manager"], { kind: "shops", shops: [] }))).toEqual([]);
    expect(keys(reader(["clerk"], { kind: "all" }))).toEqual([]);
    expect(keys(reader(["technician"], { kind: "shops", shops: ["S3"] }))).toEqual([]);
  });
  it("never gives a shop-limited reader a group-wide section", () => {
    const limited = reader(["analyst", "manager"] as never, { kind: "shops", shops: ["S3"] });
    for (const s of [findingsSection, flaggedShopsSection]) expect(s.appliesTo(limited)).toBe(false);
    expect(shopPositionSection.appliesTo(reader(["manager", "director"], { kind: "all" }))).toBe(false);
    expect(deadlinesSection.appliesTo(reader(["manager", "director"], { kind: "all" }))).toBe(true);
  });
});

describe("buildWinter({period, rows}, tools)", () => {
  const row = (shopCode: string, partNumber: string, more: { expected: number; hold: number; onHand: number | null; orderBy: string; orderNow: boolean }) => ({
    shopCode,
    componentName: "Heater-plug set",
    partNumber,
    lower: 1,
    upper: 9,
    gap: Math.max(0, more.hold - (more.onHand ?? 0)),
    ...more,
  });
  const period = { from: "2025-11-01", to: "2026-03-31", days: 151, months: 4.96 };

  it("sums the expectation and lists only the stock gaps, earliest order-by date first, with 'order now' once it has passed", () => {
    const s = buildWinter(
      {
        period,
        rows: [
          row("S2", "P-2", { expected: 4.5, hold: 3, onHand: 1, orderBy: "2025-10-18", orderNow: false }),
          row("S1", "P-1", { expected: 12.25, hold: 8, onHand: null, orderBy: "2025-08-17", orderNow: true }),
          row("S1", "P-3", { expected: 0.5, hold: 1, onHand: 4, orderBy: "2025-10-18", orderNow: false }),
        ],
      },
      tools,
    );
    expect(s.title).toBe("Winter forecast and stock gaps, Nov 1, 2025 – Mar 31, 2026");
    // 4.5 + 12.25 + 0.5 = 17.25 expected failures at two shops
    expect(s.lines[0]).toMatch(/^17\.2\d? cold-start part failures expected over the period at 2 shops\.$/);
    expect(s.lines).toHaveLength(3);
    expect(s.lines[1]).toContain("S1 Heater-plug set (P-1)");
    expect(s.lines[1]).toContain("on hand not entered, short by 8");
    expect(s.lines[1]).toContain("order now");
    expect(s.lines[2]).toContain("S2 Heater-plug set (P-2)");
    expect(s.lines[2]).toContain("short by 2; order by Oct 18, 2025.");
    expect(s.lines.join(" ")).not.toContain("P-3");
    expect(s.links[0]!.url).toBe("https://ironledger.invalid/winter");
  });

  it("says so when stock covers every part, and when no machine carries a forecast part", () => {
    const covered = buildWinter({ period, rows: [row("S1", "P-1", { expected: 2, hold: 2, onHand: 5, orderBy: "2025-10-18", orderNow: false })] }, tools);
    expect(covered.lines).toEqual([expect.stringContaining("at shop S1."), "Stock on hand covers every part's demand over its lead time at the chosen service level."]);
    expect(buildWinter({ period, rows: [] }, tools).lines).toEqual(["No machines in your shops carry a cold-start part the forecast covers."]);
  });

  it("goes to analysts, directors and managers with shops, not to clerks or technicians", () => {
    const reader = (roles: DigestReader["roles"], scope: DigestReader["scope"]): DigestReader => ({ sub: "u", name: "U", roles, scope });
    expect(winterSection.appliesTo(reader(["analyst"], { kind: "all" }))).toBe(true);
    expect(winterSection.appliesTo(reader(["manager"], { kind: "shops", shops: ["S1"] }))).toBe(true);
    expect(winterSection.appliesTo(reader(["manager"], { kind: "shops", shops: [] }))).toBe(false);
    expect(winterSection.appliesTo(reader(["clerk"], { kind: "all" }))).toBe(false);
    expect(winterSection.appliesTo(reader(["technician"], { kind: "shops", shops: ["S1"] }))).toBe(false);
  });
});
