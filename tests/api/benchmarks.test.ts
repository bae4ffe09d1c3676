import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import { shops as demoShops } from "../../etl/demo/scenario.js";
import { peerBands } from "../../server/analytics/benchmark-bands.js";
import {
  comebackPairsSchema,
  funnelSchema,
  shopBenchmarksSchema,
  trendSchema,
  type ShopBenchmarks,
} from "../../shared/schemas/benchmarks.js";

// The planted comeback shop and its pass bands come from the scenario brief (../shared/SCENARIO.md, planted
// signal (b)): S5 12–18 %, every other shop 3–7 %, technician S5-T2 at least 25 %, over the whole window. The
// statistics themselves (Wilson, funnel limits) are checked against published cases in tests/unit/analytics.

let t: TestApp;
let director: string;
let manager: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  director = await t.signInAs({ roles: ["director"] });
  manager = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const get = async (url: string, cookie: string) => (await request(t.app).get(url).set("Cookie", cookie).expect(200)).body as unknown;
const shopsFor = async (cookie: string, params: Record<string, string | number> = {}): Promise<ShopBenchmarks> =>
  shopBenchmarksSchema.parse(await get(apiPaths.benchmarks("shops", params), cookie));

describe("GET /api/benchmarks/shops on the demo world", () => {
  it("flags S5 above the 99.8 % funnel limit with a comeback rate of 12–18 % and every other shop at 3–7 %", async () => {
    const body = await shopsFor(director, { period: "all" });
    expect(body.period.countedThrough).toBe("2025-05-31");
    const s5 = body.shops.find((s) => s.shopCode === "S5")!;
    expect(s5.comeback.value!).toBeGreaterThanOrEqual(0.12);
    expect(s5.comeback.value!).toBeLessThanOrEqual(0.18);
    expect(s5.comeback.funnel).toBe("above_998");
    expect(s5.comeback.aboveGroup).toBe(true);
    for (const s of body.shops.filter((x) => x.shopCode !== "S5")) {
      expect(s.comeback.value!, s.label).toBeGreaterThanOrEqual(0.03);
      expect(s.comeback.value!, s.label).toBeLessThanOrEqual(0.07);
      expect(s.comeback.funnel, s.label).not.toMatch(/^above/);
    }
    expect(body.visits[0]).toMatchObject({ key: "S5", severity: "visit" });
    expect(body.visits.map((v) => v.key)).toEqual(["S5"]);
  });

  it("finds technician S5-T2 at 25 % or more and names them in the visit reasons", async () => {
    const body = await shopsFor(director, { period: "all" });
    const s5 = body.shops.find((s) => s.shopCode === "S5")!;
    const t2 = s5.technicians!.find((x) => x.techId === "S5-T2")!;
    expect(t2.comeback.value!).toBeGreaterThanOrEqual(0.25);
    expect(t2.aboveGroup).toBe(true);
    expect(body.visits[0]!.reasons.some((r) => r.startsWith("Technician S5-T2"))).toBe(true);
  });

  it("flags S5 in the default view, the 12 months to the last month whose comeback window has passed", async () => {
    const body = await shopsFor(director);
    expect(body.period).toMatchObject({ kind: "rolling12", key: "12m-2025-05", from: "2024-06-01", to: "2025-05-31", complete: true });
    expect(body.visits[0]).toMatchObject({ key: "S5", severity: "visit" });
  });

  it("counts no line whose comeback window is still open", async () => {
    // data end 2025-06-30; lines closed in June 2025 have until July to come back
    const body = await shopsFor(director, { period: "month", at: "2025-06" });
    expect(body.period.complete).toBe(false);
    expect(body.group!.lines).toBe(0);
    expect(body.shops.every((s) => s.comeback.funnel === "not_rated")).toBe(true);
  });

  it("widens the window with the settings: a 60-day window finds at least as many comebacks", async () => {
    const d30 = await shopsFor(director, { period: "year", at: "2024-12" });
    const d60 = await shopsFor(director, { period: "year", at: "2024-12", days: 60, hours: 200 });
    expect(d60.group!.comeback.successes!).toBeGreaterThanOrEqual(d30.group!.comeback.successes!);
    expect(d60.formulas.comebackRate).toMatch(/within 60 days and 200 engine hours/);
  });

  it("shows the other KPIs with their formulas, and warranty as no data yet while no claim exists", async () => {
    const body = await shopsFor(director, { period: "all" });
    expect(body.formulas.labourEfficiency).toMatch(/Σ standard .* ÷ Σ actual/);
    expect(body.group!.efficiency.value!).toBeGreaterThan(0.5);
    expect(body.group!.partsWait.median).not.toBeNull();
    expect(body.group!.coldStartMeasured.n!).toBeGreaterThan(0);
    expect(body.group!.warrantyOnTime).toMatchObject({ value: null, note: expect.stringMatching(/^no data yet/) });
  });

  it("shows the back-order winter: K26 heater-plug parts waited weeks in winter 2022–23", async () => {
    // SCENARIO (c): 70 % back-ordered, median wait about 55 days in Nov 2022–Feb 2023; the shop KPI mixes all part
    // lines, so only the tail moves: the group's 90th percentile that winter is far above other winters'.
    const winter = await shopsFor(director, { period: "quarter", at: "2023-01" });
    const other = await shopsFor(director, { period: "quarter", at: "2024-01" });
    expect(winter.group!.partsWait.p90!).toBeGreaterThan(3 * other.group!.partsWait.p90!);
  });

  it("answers 400 with the problem in words for a window outside 7–90 days", async () => {
    const res = await request(t.app).get(apiPaths.benchmarks("shops", { days: 5 })).set("Cookie", director).expect(400);
    expect(res.body.error.message).toMatch(/days/);
  });
});

describe("GET /api/benchmarks/shops for a shop manager", () => {
  const otherCodes = demoShops.map((s) => s.code).filter((c) => c !== "S5");
  const otherTowns = demoShops.filter((s) => s.code !== "S5").map((s) => s.town);
  const leaks = (json: string) => [
    ...otherCodes.filter((c) => new RegExp(`\\b${c}\\b`).test(json)),
    ...otherTowns.filter((town) => json.includes(town)),
  ];

  it("names their own shop and shows the others only as groups of three or more, without codes, towns or rows", async () => {
    const body = await shopsFor(manager, { period: "all" });
    expect(body.shops.map((s) => s.label)).toEqual(["S5 Maplewick"]);
    expect(body.peers!.shops).toBe(7);
    const { shops: _count, rule, ...spreads } = body.peers!;
    expect(rule).toMatch(/at least 3 shops/);
    for (const [figure, spread] of Object.entries(spreads)) {
      for (const g of spread.groups) expect(g.shops, figure).toBeGreaterThanOrEqual(3);
    }
    expect(body.formulas.anonymity).toBe(rule);
    expect(leaks(JSON.stringify(body))).toEqual([]);
  });

  it("leaks no other shop through the funnel, the trend or the comeback pairs", async () => {
    for (const what of ["funnel", "trend", "comebacks"] as const) {
      for (const period of ["all", "rolling12", "month"]) {
        const params = what === "comebacks" ? { shop: "S5", period } : { period };
        const json = JSON.stringify(await get(apiPaths.benchmarks(what, params), manager));
        expect(leaks(json), `${what} ${period}`).toEqual([]);
        expect(json).not.toMatch(/S[1-46-8]-T\d/);
      }
    }
  });

  it("plots and charts only their own shop: no point or series stands for another shop", async () => {
    const funnel = funnelSchema.parse(await get(apiPaths.benchmarks("funnel", { period: "all" }), manager));
    expect(funnel.points.map((p) => p.label)).toEqual(["S5 Maplewick"]);
    const trend = trendSchema.parse(await get(apiPaths.benchmarks("trend"), manager));
    expect(trend.series.map((x) => x.label)).toEqual(["S5 Maplewick"]);
  });

  it("refuses the comeback pairs of another shop with 403", async () => {
    await request(t.app).get(apiPaths.benchmarks("comebacks", { shop: "S1" })).set("Cookie", manager).expect(403);
    await request(t.app).get(apiPaths.benchmarks("comebacks", { shop: "S9" })).set("Cookie", manager).expect(403);
  });
});

describe("GET /api/benchmarks/funnel", () => {
  it("plots S5 above the 99.8 % limit at its volume, around the group rate", async () => {
    const body = funnelSchema.parse(await get(apiPaths.benchmarks("funnel", { period: "all" }), director));
    const s5 = body.points.find((p) => p.key === "S5")!;
    expect(s5.status).toBe("above_998");
    expect(s5.words).toMatch(/above the 99\.8 % limit/);
    const near = body.limits.reduce((best, l) => (Math.abs(l.n - s5.x) < Math.abs(best.n - s5.x) ? l : best));
    expect(s5.rate).toBeGreaterThan(near.upper998);
    expect(body.limits.every((l) => l.lower998 <= l.lower95 && l.upper95 <= l.upper998)).toBe(true);
    expect(body.groupRate!).toBeGreaterThan(0.03);
  });

  it("merges a peer that would be alone in its band into the nearest band with others", () => {
    // 150, 200, 250 fall in 100–299; 314 alone in 300–999 → all four share 100–999
    expect(peerBands([150, 200, 250, 314]).map((b) => b.label)).toEqual(Array(4).fill("100–999 lines"));
    // 40 alone in 30–99, 120 and 130 in 100–299, 400 and 500 in 300–999: 40 joins the nearer band above
    expect(peerBands([40, 120, 130, 400, 500]).map((b) => b.label)).toEqual(["30–299 lines", "30–299 lines", "30–299 lines", "300–999 lines", "300–999 lines"]);
  });
});

describe("GET /api/benchmarks/trend", () => {
  it("gives each shop 12 months of rolling 12-month rates, S5 above the group in every month", async () => {
    const body = trendSchema.parse(await get(apiPaths.benchmarks("trend"), director));
    expect(body.months).toHaveLength(12);
    expect(body.months[11]).toBe("2025-05");
    const s5 = body.series.find((s) => s.key === "S5")!;
    s5.points.forEach((p, i) => expect(p.rolling.value!, p.month).toBeGreaterThan(body.group[i]!.rolling.value!));
  });
});

describe("GET /api/benchmarks/comebacks", () => {
  it("lists the repair-order pairs behind S5's figure, each within the window", async () => {
    const shops = await shopsFor(director, { period: "rolling12" });
    const s5 = shops.shops.find((s) => s.shopCode === "S5")!;
    const body = comebackPairsSchema.parse(await get(apiPaths.benchmarks("comebacks", { shop: "S5" }), director));
    expect(body.lines).toBe(s5.comeback.n);
    expect(body.withComeback).toBe(s5.comeback.successes);
    const originals = new Set(body.pairs.map((p) => `${p.original.roNumber}/${p.original.lineNo}`));
    expect(originals.size).toBe(body.withComeback);
    for (const p of body.pairs) {
      expect(p.daysAfterClose).toBeGreaterThanOrEqual(0);
      expect(p.daysAfterClose).toBeLessThanOrEqual(30);
      expect(p.followUp.opened >= p.original.closed!).toBe(true);
      if (p.hoursAfterClose !== null) expect(p.hoursAfterClose).toBeLessThanOrEqual(100);
    }
  });

  it("narrows to one technician: S5-T2's pairs are theirs", async () => {
    const body = comebackPairsSchema.parse(await get(apiPaths.benchmarks("comebacks", { shop: "S5", technician: "S5-T2" }), manager));
    expect(body.pairs.length).toBeGreaterThan(0);
    expect(body.pairs.every((p) => p.original.technician!.startsWith("S5-T2 "))).toBe(true);
  });
});

describe("roles on /api/benchmarks", () => {
  it("answers 401 without a session and 403 for a warranty clerk", async () => {
    await request(t.app).get(apiPaths.benchmarks("shops")).expect(401);
    const clerk = await t.signInAs({ roles: ["clerk"] });
    await request(t.app).get(apiPaths.benchmarks("funnel")).set("Cookie", clerk).expect(403);
  });

  it("lets an analyst and an admin see every shop by name", async () => {
    for (const roles of [["analyst"], ["admin"]] as const) {
      const body = await shopsFor(await t.signInAs({ roles: [...roles] }));
      expect(body.shops.filter((s) => !s.peer)).toHaveLength(8);
    }
  });
});

describe("claims filed on time, once claims exist", () => {
  it("divides claims submitted by the deadline by claims submitted or past it", async () => {
    // S5, ROs closed in March 2025 (inside the 12 months to May 2025), deadline close + 30 days = 2025-04-09:
    // went out 04-01 (on time, recorded on 04-12), went out 04-20 (late), never submitted and past the deadline (late) → 1 ÷ 3
    const claim = (n: number, submitted: string | null, recorded = submitted) => ({
      claim_number: `T-${n}`, kind: "repair" as const, status: submitted ? ("submitted" as const) : ("draft" as const), title: `test claim ${n}`, shop_code: "S5",
      engine_family: "K26-4R", closed_date: "2025-03-10", claim_days: 30, deadline: "2025-04-09", created_by: "test", created_by_name: "Test",
      submitted_at: recorded ? new Date(`${recorded}T12:00:00Z`) : null,
      ...(submitted ? { filed_via: "other" as const, filed_reference: `PORTAL-${n}`, filed_on: submitted } : {}),
    });
    await t.db.insertInto("warranty_claim").values([claim(1, "2025-04-01", "2025-04-12"), claim(2, "2025-04-20"), claim(3, null)]).execute();
    const body = await shopsFor(director);
    const s5 = body.shops.find((s) => s.shopCode === "S5")!;
    expect(s5.warrantyOnTime).toMatchObject({ successes: 1, n: 3, value: expect.closeTo(1 / 3, 12) });
    const s1 = body.shops.find((s) => s.shopCode === "S1")!;
    expect(s1.warrantyOnTime).toMatchObject({ value: null, note: "no claims for lines closed in this period" });
  });
});
