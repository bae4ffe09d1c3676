import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import type { ComponentRates, CostRates, RateComparisonAnswer } from "../../shared/schemas/analytics-rates.js";
import type { CostMcfResponse, KaplanMeierResponse, McfResponse, WeibullResponse } from "../../shared/schemas/analytics-life.js";
import { compareRates } from "../../server/analytics/rate-ratio.js";
import { weibullQuantile } from "../../server/analytics/weibull.js";

// The analyst's comparisons on the demo world (../shared/SCENARIO.md: lot BT-2109 of heater plugs, fitted to
// K26-4R machines built 2021-09 to 2021-12, wears out far sooner). The statistics are checked against published
// cases in tests/unit/analytics; here: the routes' wiring, their agreement with each other and with the
// warehouse, validation in words, and the manager's shop scope.

let t: TestApp;
let analyst: string;
let manager: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  manager = await t.signInAs({ roles: ["manager"], shops: ["S1"] });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const get = async <T,>(url: string, cookie = analyst): Promise<T> => (await request(t.app).get(url).set("Cookie", cookie).expect(200)).body as T;

describe("GET /api/analytics/rates/compare", () => {
  it("finds lot BT-2109's heater plugs failing more often per 1,000 engine hours than the other K26-4R lots, and says so in words", async () => {
    const body = await get<RateComparisonAnswer>(apiPaths.rateCompare("compareBy=lot&a=BT-2109&component=ENG-CSA-HPLUG&engineFamilies=K26-4R"));
    expect(body.comparison).not.toBeNull();
    expect(body.comparison!.ratio!).toBeGreaterThan(1);
    expect(body.comparison!.lower).toBeGreaterThan(1);
    expect(body.comparison!.pValue).toBeLessThan(0.01);
    expect(body.sentence).toMatch(/^Lot BT-2109 fails [\d.,]+ times as often as all other lots per 1,000 engine hours \(95 % CI [\d.,]+–[\d.,]+, p [<=] [\d.]+\)\.$/);
  });

  it("recomputes to the same figures from its own counts (rate ratio and exact test of server/analytics/rate-ratio.ts)", async () => {
    const body = await get<RateComparisonAnswer>(apiPaths.rateCompare("compareBy=engineFamily&a=K18-3G&b=K26-4R&component=ENG-CSA-HPLUG"));
    const c = compareRates(body.a.failures, body.a.engineHours, body.b.failures, body.b.engineHours)!;
    expect(body.comparison!.ratio).toBeCloseTo(c.ratio!, 12);
    expect(body.comparison!.pValue).toBeCloseTo(c.pValue, 12);
    expect(body.a.perThousandHours!.rate).toBeCloseTo((1000 * body.a.failures) / body.a.engineHours, 9);
  });

  it("splits the fleet without loss: a family against all others adds up to the component Pareto's failures and engine hours", async () => {
    const pareto = await get<ComponentRates>(apiPaths.rates("components", "components=ENG-CSA-HPLUG"));
    const body = await get<RateComparisonAnswer>(apiPaths.rateCompare("compareBy=engineFamily&a=K18-3G&component=ENG-CSA-HPLUG"));
    expect(body.a.failures + body.b.failures).toBe(pareto.rows.find((r) => r.component === "ENG-CSA-HPLUG")!.failures);
    expect(body.a.engineHours + body.b.engineHours).toBeCloseTo(pareto.engineHours, 3);
  });

  it("answers 400 in words without compareBy or group A, and 401 without a session", async () => {
    const noBy = await request(t.app).get(apiPaths.rateCompare("a=S1")).set("Cookie", analyst).expect(400);
    expect(noBy.body.error.message).toMatch(/compareBy must be lot, engineFamily or shop/);
    const noA = await request(t.app).get(apiPaths.rateCompare("compareBy=shop")).set("Cookie", analyst).expect(400);
    expect(noA.body.error.message).toMatch(/group A/);
    await request(t.app).get(apiPaths.rateCompare("compareBy=shop&a=S1")).expect(401);
  });

  it("gives a manager of S1 no figures of another shop: S8's hours and failures are 0 and there is no comparison", async () => {
    const body = await get<RateComparisonAnswer>(apiPaths.rateCompare("compareBy=shop&a=S1&b=S8"), manager);
    expect(body.a.engineHours).toBeGreaterThan(0);
    expect(body.b).toMatchObject({ failures: 0, engineHours: 0, perThousandHours: null });
    expect(body.comparison).toBeNull();
    const analystView = await get<RateComparisonAnswer>(apiPaths.rateCompare("compareBy=shop&a=S1&b=S8"));
    expect(analystView.b.engineHours).toBeGreaterThan(0);
    expect(analystView.a).toEqual(body.a);
  });
});

describe("GET /api/analytics/rates/costs", () => {
  it("adds up to the warehouse's parts + labour cost of failure lines, per 1,000 engine hours of each shop", async () => {
    const body = await get<CostRates>(apiPaths.costRates());
    const direct = await sql<{ cost: number }>`
      SELECT sum(coalesce(parts_cost, 0) + coalesce(labor_cost, 0))::double precision AS cost FROM fact_repair_line WHERE line_type = 'failure'
    `.execute(t.db);
    expect(body.cost).toBeGreaterThan(0);
    expect(body.cost).toBeCloseTo(Number(direct.rows[0].cost), 2);
    for (const s of body.shops) expect(s.perThousandHours!).toBeCloseTo((1000 * s.cost) / s.engineHours, 9);
    expect(body.rows.reduce((sum, r) => sum + r.cost, 0)).toBeCloseTo(body.cost, 2);
  });

  it("shows a manager of S1 only S1", async () => {
    const body = await get<CostRates>(apiPaths.costRates(), manager);
    expect(body.shops.map((s) => s.shop)).toEqual(["S1"]);
    expect([...new Set(body.rows.map((r) => r.shop))]).toEqual(["S1"]);
  });
});

describe("GET /api/analytics/life/cost-mcf", () => {
  it("counts the same machines and repairs as the count MCF, with their cost", async () => {
    const search = "component=HYD-LIN-HOSE";
    const [cost, count] = await Promise.all([get<CostMcfResponse>(apiPaths.lifeCostMcf(search)), get<McfResponse>(apiPaths.life("mcf", search))]);
    expect(cost.groups[0].machines).toBe(count.groups[0].machines);
    expect(cost.groups[0].repairs).toBe(count.groups[0].repairs);
    expect(cost.groups[0].totalCost).toBeGreaterThan(0);
    expect(cost.groups[0].steps.at(-1)!.mcf).toBeGreaterThan(0);
  });
});

describe("GET /api/analytics/life/weibull and kaplan-meier with bLife", () => {
  const base = "component=ENG-CSA-HPLUG&engineFamilies=K26-4R";

  it("gives B10 equal to the fit's own B10 and its interval, and B25 = η(−ln 0.75)^{1/β}", async () => {
    const b10 = await get<WeibullResponse>(apiPaths.life("weibull", base));
    const fit = b10.groups[0].fit;
    if (fit.status !== "fitted") throw new Error("expected a fit");
    expect(fit.bLife.percent).toBe(10);
    expect(fit.bLife.estimate!).toBeCloseTo(fit.b10, 6);
    expect(fit.bLife.lower! / fit.b10Interval!.lower!).toBeCloseTo(1, 5);
    expect(fit.bLife.upper! / fit.b10Interval!.upper!).toBeCloseTo(1, 5);
    const b25 = (await get<WeibullResponse>(apiPaths.life("weibull", `${base}&bLife=25`))).groups[0].fit;
    if (b25.status !== "fitted") throw new Error("expected a fit");
    expect(b25.bLife.estimate! / weibullQuantile(0.25, b25.shape, b25.scale)).toBeCloseTo(1, 12);
    expect(b25.bLife.lower!).toBeLessThan(b25.bLife.estimate!);
    expect(b25.bLife.upper!).toBeGreaterThan(b25.bLife.estimate!);
  });

  it("reads the B-life off the Kaplan–Meier curve, between the last step above 1 − p and the first at or below it", async () => {
    const body = await get<KaplanMeierResponse>(apiPaths.life("kaplan-meier", `${base}&bLife=5`));
    const g = body.groups[0];
    expect(g.bLife.percent).toBe(5);
    const first = g.steps.find((s) => s.survival <= 0.95)!;
    const before = g.steps.filter((s) => s.survival > 0.95).at(-1)!;
    expect(g.bLife.estimate!).toBeLessThanOrEqual(first.time);
    expect(g.bLife.estimate!).toBeGreaterThan(before.time);
    expect(g.bLife.lower!).toBeLessThanOrEqual(g.bLife.estimate!);
  });

  it.each(["0", "51", "2.5", "ten"])("answers 400 in words for bLife=%s", async (v) => {
    const res = await request(t.app).get(apiPaths.life("weibull", `${base}&bLife=${v}`)).set("Cookie", analyst).expect(400);
    expect(res.body.error.message).toMatch(/bLife must be a whole number from 1 to 50/);
  });
});
