import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import type { MonthlyRates } from "../../shared/schemas/analytics-rates.js";
import type { Overview } from "../../shared/schemas/overview.js";
import { addMonthsToMonth } from "../../shared/dates.js";

// The demo world's exports end part-way through their readings: each machine's last hour reading falls at its
// last service or repair, so the newest months carry too few engine hours. These tests check that the monthly
// chart knows it (coverage, complete) and that it compares each month with its own fleet's expectation.
// The statistics (Poisson quantiles, u-chart) are checked against published tables in tests/unit/analytics.

let t: TestApp;
let analyst: string;
let body: MonthlyRates;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  body = (await request(t.app).get("/api/analytics/rates/monthly").set("Cookie", analyst).expect(200)).body as MonthlyRates;
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

describe("GET /api/analytics/rates/monthly on the demo world", () => {
  it("marks the last month of data incomplete and raises no alarm for it, nor for any incomplete month", () => {
    const last = body.rows[body.rows.length - 1];
    expect(last.complete).toBe(false);
    expect(last.coverage).toBeLessThan(0.5);
    // its plain rate is well above the months before: exactly the false alarm an unaware chart would raise
    const before = body.rows.filter((r) => r.complete).slice(-6);
    const typical = before.reduce((s, r) => s + r.perThousandHours!.rate, 0) / before.length;
    expect(last.perThousandHours!.rate).toBeGreaterThan(1.5 * typical);
    for (const r of body.rows.filter((x) => !x.complete)) {
      expect(r.outOfControl).toBe(false);
      expect(r.outOfControlPlain).toBe(false);
      expect(r.ratioUpper).toBeNull();
      expect(r.controlUpper).toBeNull();
    }
    expect(body.flagged.every((f) => body.rows.find((r) => r.month === f.month)!.complete)).toBe(true);
    expect(body.incompleteNote).toContain(last.month);
  });

  it("counts the months of full readings as complete and only a tail of newest months as incomplete", () => {
    const firstIncomplete = body.rows.findIndex((r) => !r.complete && r.month > "2021-01");
    expect(firstIncomplete).toBeGreaterThan(0);
    expect(body.rows.slice(firstIncomplete).every((r) => !r.complete)).toBe(true);
    expect(body.rows.length - firstIncomplete).toBeLessThanOrEqual(8);
    for (const r of body.rows.filter((x) => x.month >= "2022-01" && x.month <= "2023-12")) expect(r.coverage).toBeGreaterThan(0.99);
  });

  it("calibrates the expectation so the complete months together read 1", () => {
    const complete = body.rows.filter((r) => r.complete);
    const observed = complete.reduce((s, r) => s + r.failures, 0);
    const expected = complete.reduce((s, r) => s + r.expected, 0);
    expect(expected).toBeCloseTo(observed, 6);
    expect(body.reference).toEqual({ from: complete[0].month, to: complete[complete.length - 1].month, months: complete.length });
  });

  it("expects more failures from an older fleet: the expectation per engine hour climbs with the fleet's age", () => {
    const complete = body.rows.filter((r) => r.complete && r.engineHours > 50_000);
    const early = complete.slice(0, 12);
    const late = complete.slice(-12);
    const perHour = (rows: typeof complete) => rows.reduce((s, r) => s + r.expected, 0) / rows.reduce((s, r) => s + r.engineHours, 0);
    expect(perHour(late)).toBeGreaterThan(perHour(early));
  });

  it("says in words what each flagged month is beyond the fleet's hours, ages and weather, and flags fewer months than the plain chart", () => {
    for (const f of body.flagged) {
      expect(f.words).toMatch(/failures where the month's engine hours, the fleet's ages and the weather predict/);
      const row = body.rows.find((r) => r.month === f.month)!;
      expect(f.direction === "above" ? row.failures > row.expected : row.failures < row.expected).toBe(true);
    }
    const plainFlags = body.rows.filter((r) => r.outOfControlPlain).length;
    expect(body.flagged.length).toBeLessThanOrEqual(plainFlags);
    console.info(`monthly chart: ${body.rows.length} months, ${body.rows.filter((r) => !r.complete).length} incomplete, ${body.flagged.length} flagged by observed ÷ expected, ${plainFlags} by the plain u-chart; reference ${JSON.stringify(body.reference)}`);
    for (const f of body.flagged) console.info(f.words);
  });
});

describe("GET /api/overview headline on the demo world", () => {
  it("compares complete twelve-month windows, ending with the chart's last complete month, and says which months it leaves out", async () => {
    const o = (await request(t.app).get("/api/overview").set("Cookie", analyst).expect(200)).body as Overview;
    const lastComplete = body.rows.filter((r) => r.complete).at(-1)!.month;
    const newest = body.rows.at(-1)!.month;
    expect(o.headlines.thisYear).toEqual({ from: addMonthsToMonth(lastComplete, -11), to: lastComplete });
    expect(o.headlines.lastYear).toEqual({ from: addMonthsToMonth(lastComplete, -23), to: addMonthsToMonth(lastComplete, -12) });
    expect(newest > lastComplete).toBe(true);
    const monthWords = (m: string) => new Date(`${m}-01T00:00:00Z`).toLocaleDateString("en-GB", { month: "long", year: "numeric", timeZone: "UTC" });
    expect(o.headlines.note).toContain(`Compares ${monthWords(addMonthsToMonth(lastComplete, -11))} – ${monthWords(lastComplete)}`);
    expect(o.headlines.note).toContain(monthWords(newest));
    expect(o.headlines.note).toMatch(/are left out: hour readings do not yet cover enough/);
  });
});
