import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { winterBacktestSchema, winterForecastSchema, winterStockSchema, type WinterForecast } from "../../shared/schemas/winter.js";
import { stockToHold } from "../../server/analytics/winter-forecast.js";

// The demo world and its planted signals come from the scenario page (../shared/SCENARIO.md): cold shops S1, S2,
// S3, S7 and mild S5, S6, S8 ("Shops & weather"); the K26 heater-plug back-order winter 2022–23 ("Planted
// signals" (c)); the history ends on 2025-06-30 (tests/helpers/test-db.ts TEST_DEMO_ANCHOR). The maths itself is
// checked against published tables in tests/unit/analytics/winter-forecast.test.ts.

const ORIGIN = "http://127.0.0.1:8080";
const K26_PLUG = "KW26HP410";

let t: TestApp;
let analyst: string;
let managerS5: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"], name: "Ana Lyst" });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"], name: "Shop Five Manager" });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const get = (url: string, cookie: string) => request(t.app).get(url).set("Cookie", cookie);
const put = (cookie: string, body: unknown) => request(t.app).put("/api/winter/stock").set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);
const stored = async () => ({
  rows: (await t.db.selectFrom("winter_stock").selectAll().execute()).length,
  events: (await t.db.selectFrom("winter_stock_event").selectAll().execute()).length,
});

describe("GET /api/winter/forecast", () => {
  let body: WinterForecast;
  beforeAll(async () => {
    body = winterForecastSchema.parse((await get("/api/winter/forecast", analyst).expect(200)).body);
  }, 120_000);

  it("forecasts the next winter after the data's end, for every shop, with the method and its caveats in words", () => {
    expect(body.dataEnd).toBe("2025-06-30");
    expect(body.period).toMatchObject({ from: "2025-11-01", to: "2026-03-31", days: 151 });
    expect(new Set(body.rows.map((r) => r.shopCode))).toEqual(new Set(["S1", "S2", "S3", "S4", "S5", "S6", "S7", "S8"]));
    expect(body.method).toMatch(/1 − exp\(−k·/);
    expect(body.method).toMatch(/Shop calibration/);
    expect(body.method).toMatch(/\(O \+ 10\) ÷ \(E \+ 10\)/);
    expect(body.intervalNote).toMatch(/leaves out the uncertainty of the fitted/);
    expect(body.caution).toMatch(/service manual/);
  });

  it("fits the planted heater-plug lot on its own, with a much shorter life than the other K26 lots (scenario (a): η ratio 0.22–0.45)", () => {
    const lot = body.fits.find((f) => f.component === "ENG-CSA-HPLUG" && f.engineFamily === "K26-4R" && f.lot === "BT-2109");
    const rest = body.fits.find((f) => f.component === "ENG-CSA-HPLUG" && f.engineFamily === "K26-4R" && f.lot === null);
    expect(lot && rest).toBeTruthy();
    const ratio = lot!.scale / rest!.scale;
    expect(ratio).toBeGreaterThan(0.22);
    expect(ratio).toBeLessThan(0.45);
  });

  it("gives the cold shops a heater-plug cold factor above 1 and the mild shops one below 1 (scenario: cold S1 S2 S3 S7, mild S6 S8)", () => {
    const k = (shop: string) => body.rows.find((r) => r.shopCode === shop && r.partNumber === K26_PLUG)!.coldFactor;
    for (const s of ["S1", "S2", "S3", "S7"]) expect(k(s)).toBeGreaterThan(1);
    for (const s of ["S6", "S8"]) expect(k(s)).toBeLessThan(1);
  });

  it("plans the K26 heater-plug lead time on the 90th percentile of the back-orders of past winters (scenario (c): waits of weeks in 2022–23)", () => {
    const lead = body.leadTimes.find((l) => l.partNumber === K26_PLUG)!;
    expect(lead.backOrderedLines).toBeGreaterThanOrEqual(5);
    expect(lead.planningDays).toBe(Math.ceil(lead.p90Days!));
    expect(lead.medianDays!).toBeGreaterThan(30);
    const row = body.rows.find((r) => r.shopCode === "S1" && r.partNumber === K26_PLUG)!;
    expect(row.leadTimeDays).toBe(lead.planningDays);
    expect(row.orderBy).toBe(new Date(Date.parse("2025-11-01T00:00:00Z") - lead.planningDays * 86_400_000).toISOString().slice(0, 10));
  });

  it("keeps each row's numbers consistent: interval around Σp, hold as the Poisson quantile of the lead-time demand, gap = hold with nothing entered", () => {
    for (const r of body.rows) {
      expect(r.lower).toBeLessThanOrEqual(Math.ceil(r.expected));
      expect(r.upper).toBeGreaterThanOrEqual(Math.floor(r.expected));
      expect(r.leadTimeDemand).toBeCloseTo((r.expected / 151) * r.leadTimeDays, 2);
      expect(r.hold).toBe(stockToHold(r.leadTimeDemand, 0.9));
      expect(r.onHand).toBeNull();
      expect(r.gap).toBe(r.hold);
    }
  });

  it("holds at least as much at a higher service level", async () => {
    const high = winterForecastSchema.parse((await get("/api/winter/forecast?serviceLevel=0.99", analyst).expect(200)).body);
    for (const r of high.rows) {
      const base = body.rows.find((b) => b.shopCode === r.shopCode && b.partNumber === r.partNumber)!;
      expect(r.hold).toBeGreaterThanOrEqual(base.hold);
    }
  });

  it("takes another period: a shorter one expects fewer failures", async () => {
    const dec = winterForecastSchema.parse((await get("/api/winter/forecast?from=2025-12-01&to=2025-12-31", analyst).expect(200)).body);
    expect(dec.period).toMatchObject({ from: "2025-12-01", to: "2025-12-31", days: 31 });
    const sum = (f: WinterForecast) => f.rows.reduce((s, r) => s + r.expected, 0);
    expect(sum(dec)).toBeLessThan(sum(body));
  });

  it("refuses a service level outside 0.5–0.999 and a period that ends before it starts, in words", async () => {
    const a = await get("/api/winter/forecast?serviceLevel=2", analyst).expect(400);
    expect(a.body.error.message).toMatch(/Service level should be a number from 0.5 to 0.999/);
    const b = await get("/api/winter/forecast?from=2025-12-01&to=2025-11-01", analyst).expect(400);
    expect(b.body.error.message).toMatch(/The From date is after the To date/);
  });

  it("calibrates each shop × component on the two complete winters before the data's end, as (O + a) ÷ (E + a)", () => {
    expect(body.calibration.seasons).toEqual([{ from: "2024-11-01", to: "2025-03-31" }, { from: "2023-11-01", to: "2024-03-31" }]);
    const a = body.calibration.prior;
    for (const c of body.calibration.cells) expect(c.ratio).toBeCloseTo((c.observed + a) / (c.expected + a), 3);
    for (const r of body.rows) {
      const cell = body.calibration.cells.find((c) => c.shopCode === r.shopCode && c.component === r.component);
      expect(r.calibration).toBeCloseTo(cell?.ratio ?? 1, 3);
      // a ratio above 1 raises every part's probability, below 1 lowers it
      if (r.calibration > 1.001) expect(r.expected).toBeGreaterThan(r.modelExpected);
      if (r.calibration < 0.999) expect(r.expected).toBeLessThan(r.modelExpected);
    }
  });

  it("gives a manager only their own shop's rows", async () => {
    const mine = winterForecastSchema.parse((await get("/api/winter/forecast", managerS5).expect(200)).body);
    expect(mine.rows.length).toBeGreaterThan(0);
    expect(new Set(mine.rows.map((r) => r.shopCode))).toEqual(new Set(["S5"]));
    const groupS5 = body.rows.filter((r) => r.shopCode === "S5");
    expect(mine.rows.map((r) => r.expected)).toEqual(groupS5.map((r) => r.expected));
    expect(new Set(mine.calibration.cells.map((c) => c.shopCode))).toEqual(new Set(["S5"]));
  });

  it("is refused to a technician and to a caller without a session", async () => {
    const tech = await t.signInAs({ roles: ["technician"], shops: ["S5"] });
    await get("/api/winter/forecast", tech).expect(403);
    await request(t.app).get("/api/winter/forecast").expect(401);
  });
});

describe("GET /api/winter/backtest", () => {
  it("holds out winter 2024–25 and lands near the actual count", async () => {
    const b = winterBacktestSchema.parse((await get("/api/winter/backtest", analyst).expect(200)).body);
    expect(b.season).toEqual({ from: "2024-11-01", to: "2025-03-31" });
    expect(b.shops.map((s) => s.shopCode)).toEqual(["S1", "S2", "S3", "S4", "S5", "S6", "S7", "S8"]);
    for (const s of b.shops) {
      expect(s.error).toBeCloseTo(s.actual - s.forecast, 3);
      expect(s.inside).toBe(s.actual >= s.lower && s.actual <= s.upper);
    }
    // The calibration, too, comes only from winters that ended before the held-out one.
    expect(b.calibration.seasons).toEqual([{ from: "2023-11-01", to: "2024-03-31" }, { from: "2022-11-01", to: "2023-03-31" }]);
    for (const c of b.calibration.seasons) expect(c.to < b.trainedBefore).toBe(true);
    // Coverage: with 8 shops and 90 % intervals, the number inside is Binomial(8, 0.9) if the model is right:
    // P(8) = 0.9^8 = 0.4305, P(7) = 8·0.9^7·0.1 = 0.3826, P(6) = 28·0.9^6·0.01 = 0.1488, so P(k ≥ 6) ≈ 0.962 (hand
    // arithmetic; the binomial table n = 8, p = 0.1 gives P(X ≤ 2) = 0.9619). The calibrated intervals carry the
    // uncertainty of each shop's ratio, so 6 of 8 is asked for; fewer would say they are too narrow (the model
    // before calibration had 5 of 8 here, its figures kept beside).
    expect(b.coverage.shops).toBe(8);
    expect(b.coverage.inside).toBeGreaterThanOrEqual(6);
    expect(b.coverage.modelInside).toBe(b.shops.filter((s) => s.modelInside).length);
    for (const s of b.shops) expect(s.modelInside).toBe(s.actual >= s.modelLower && s.actual <= s.modelUpper);
    // Total: about 150 failures expected; a Poisson-binomial count of that size has a standard deviation of about
    // √150 ≈ 12 (8 %), and a heater-plug η fitted from about 100 failures moves the hazard by some 10–15 % (the
    // standard error of ln η̂ is about 1/(β√r) ≈ 0.06, times β ≈ 1.8, from memory of the large-sample Weibull
    // results). A factor of 1.5 either way is far outside both; an actual beyond it would mean a broken method.
    expect(b.total.actual).toBeGreaterThan(0);
    expect(b.total.forecast / b.total.actual).toBeGreaterThan(1 / 1.5);
    expect(b.total.forecast / b.total.actual).toBeLessThan(1.5);
  });

  it("gives a manager only their own shop", async () => {
    const b = winterBacktestSchema.parse((await get("/api/winter/backtest", managerS5).expect(200)).body);
    expect(b.shops.map((s) => s.shopCode)).toEqual(["S5"]);
    expect(new Set(b.rows.map((r) => r.shopCode))).toEqual(new Set(["S5"]));
  });
});

describe("PUT /api/winter/stock", () => {
  it("stores a count, keeps the change with who made it, and the forecast's gap uses it", async () => {
    const res = await put(analyst, { shopCode: "S1", partNumber: K26_PLUG, quantity: 3 }).expect(200);
    const rows = winterStockSchema.parse(res.body).rows;
    expect(rows).toEqual([expect.objectContaining({ shopCode: "S1", partNumber: K26_PLUG, quantity: 3, updatedBy: "Ana Lyst" })]);
    await put(analyst, { shopCode: "S1", partNumber: K26_PLUG, quantity: 1 }).expect(200);
    const events = await t.db.selectFrom("winter_stock_event").selectAll().orderBy("event_id").execute();
    expect(events.map((e) => [e.old_quantity, e.new_quantity, e.actor_name])).toEqual([[null, 3, "Ana Lyst"], [3, 1, "Ana Lyst"]]);
    const f = winterForecastSchema.parse((await get("/api/winter/forecast", analyst).expect(200)).body);
    const row = f.rows.find((r) => r.shopCode === "S1" && r.partNumber === K26_PLUG)!;
    expect(row.onHand).toBe(1);
    expect(row.gap).toBe(Math.max(0, row.hold - 1));
  });

  it.each([
    [{ shopCode: "S1", partNumber: K26_PLUG, quantity: -1 }, /Quantity should be a whole number of 0 or more/],
    [{ shopCode: "S1", partNumber: K26_PLUG, quantity: 2.5 }, /Quantity should be a whole number of 0 or more/],
    [{ shopCode: "S1", partNumber: K26_PLUG, quantity: "four" }, /Quantity should be a whole number of 0 or more/],
    [{ shopCode: "S1", partNumber: K26_PLUG }, /Quantity should be a whole number of 0 or more/],
    [{ shopCode: "S1", partNumber: "", quantity: 2 }, /Part number is empty/],
    [{ shopCode: "S1", partNumber: "NOT-A-PART", quantity: 2 }, /NOT-A-PART is not a cold-start part number/],
    [{ shopCode: "S99", partNumber: K26_PLUG, quantity: 2 }, /there is no shop S99/],
    [{ shopCode: "S1", partNumber: K26_PLUG, quantity: 2, note: "x" }, /not saved/],
  ])("refuses %j in words and stores nothing", async (bad, words) => {
    const before = await stored();
    const res = await put(analyst, bad).expect(400);
    expect(res.body.error.message).toMatch(words);
    expect(res.body.error.message).not.toMatch(/violates|constraint|syntax|relation/i);
    expect(await stored()).toEqual(before);
  });

  it("lets a manager count their own shop and refuses another shop's, storing nothing", async () => {
    await put(managerS5, { shopCode: "S5", partNumber: K26_PLUG, quantity: 6 }).expect(200);
    const before = await stored();
    const res = await put(managerS5, { shopCode: "S1", partNumber: K26_PLUG, quantity: 9 }).expect(403);
    expect(res.body.error.message).toMatch(/that shop is not one of yours/);
    expect(res.body.error.message).not.toMatch(/S1/);
    expect(await stored()).toEqual(before);
    const mine = winterStockSchema.parse((await get("/api/winter/stock", managerS5).expect(200)).body);
    expect(mine.rows.map((r) => [r.shopCode, r.quantity])).toEqual([["S5", 6]]);
    const all = winterStockSchema.parse((await get("/api/winter/stock", analyst).expect(200)).body);
    expect(all.rows.map((r) => r.shopCode)).toEqual(["S1", "S5"]);
  });

  it("is refused to a technician", async () => {
    const tech = await t.signInAs({ roles: ["technician"], shops: ["S5"] });
    await put(tech, { shopCode: "S5", partNumber: K26_PLUG, quantity: 1 }).expect(403);
  });
});
