import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { coldShopCodes } from "../../server/db/queries/shops.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import type { TemperatureBandRates } from "../../shared/schemas/analytics-rates.js";
import type { WeibullResponse, KaplanMeierResponse, McfResponse } from "../../shared/schemas/analytics-life.js";

// The planted signals of the invented demo world and their pass bands come from the scenario brief
// (../shared/SCENARIO.md, "Planted signals"). These tests check that the analytics find what the
// generator planted; the statistics themselves are checked against published cases in tests/unit/analytics.

let t: TestApp;
let analyst: string;
let cold: Set<string>;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  cold = await coldShopCodes(t.db);
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const get = async <T,>(url: string, cookie = analyst): Promise<T> => (await request(t.app).get(url).set("Cookie", cookie).expect(200)).body as T;

describe("the demo world at scale 1", () => {
  it("loads every file with read = inserted + updated + unchanged + rejected", async () => {
    const batches = await t.db.selectFrom("etl_batch").selectAll().execute();
    expect(batches.length).toBeGreaterThanOrEqual(26);
    for (const b of batches) {
      expect(b.status).toBe("loaded");
      expect(b.rows_read).toBe(b.rows_inserted + b.rows_updated + b.rows_unchanged + b.rows_rejected);
    }
  });

  it("has the scenario's cold shops (at least half the winter days below 20 °F)", () => {
    expect([...cold].sort()).toEqual(["S1", "S2", "S3", "S7"]);
  });
});

describe("GET /api/analytics/clusters on the demo world", () => {
  it("ranks the planted heater-plug lot and its build window first among the cold-start aids", async () => {
    const body = await get<ClusterList>("/api/analytics/clusters");
    const top = body.clusters[0];
    expect(top.dimensions.supplierLot).toBe("BT-2109");
    expect(top.dimensions.engineFamily).toBe("K26-4R");
    expect(top.dimensions.build).not.toBe("all");
    const build = top.dimensions.build as { from: string; to: string };
    expect(build.from >= "2021-09" && build.to <= "2021-12").toBe(true);
    expect(top.qValue).toBeLessThan(0.05);
    expect(top.repairLineIds.length).toBe(top.observed);
    expect(top.description).toMatch(/lot BT-2109: \d+ failures where [\d.]+ were expected/);
  });

  it("makes the planted lot one finding at the top, of heater-plug failures only, with its shop and temperature cells inside it", async () => {
    const body = await get<ClusterList>("/api/analytics/clusters");
    expect(body.level).toBe("component");
    const top = body.findings[0];
    expect(top.part).toBe("ENG-CSA-HPLUG");
    expect(top.lead.dimensions).toMatchObject({ component: "ENG-CSA-HPLUG", supplierLot: "BT-2109", engineFamily: "K26-4R" });
    expect(top.sentence).toMatch(/^Heater-plug set failures with lot BT-2109 \(engine family K26-4R, built [A-Z][a-z]{2}.*\) happen about [\d.]+ times as often as expected for the same engine hours and weather \(95 % CI [\d.]+–[\d.]+\)/);
    // the preheat relay has no finding of its own on this world (nothing is planted on it)
    expect(body.findings.filter((f) => f.part === "ENG-CSA-RELAY")).toEqual([]);
    // no other finding is of that lot: its slices are facets
    expect(body.findings.slice(1).filter((f) => f.lead.dimensions.supplierLot === "BT-2109")).toEqual([]);
    const facetDims = top.facets.map((x) => x.cluster.dimensions);
    expect(facetDims.some((d) => d.shop !== "all")).toBe(true);
    expect(facetDims.some((d) => d.temperatureBand !== "all")).toBe(true);
    expect(top.cells).toBeGreaterThan(top.facets.length);
    // every line the lot finding holds is a heater-plug line (no preheat relay, fuse or grid heater lines)
    const lines = [...new Set([top.lead, ...top.facets.map((x) => x.cluster)].flatMap((c) => c.repairLineIds))];
    const parts = await t.pool.query<{ code: string; n: number }>(
      `SELECT c.component_code AS code, count(*)::int AS n FROM fact_repair_line f JOIN dim_component c USING (component_key)
       WHERE f.repair_line_key = ANY($1::bigint[]) GROUP BY 1`,
      [lines],
    );
    expect(parts.rows).toEqual([{ code: "ENG-CSA-HPLUG", n: lines.length }]);
  });

  it("says the lot finding's life in words: the lot's B10 against the family's other lots, from the Life page's fits", async () => {
    const body = await get<ClusterList>("/api/analytics/clusters");
    const top = body.findings[0];
    const m = top.life?.match(/^Life: 10 % of heater-plug sets from lot BT-2109 have failed by ([\d,]+) h, against ([\d,]+) h for the other lots of engine family K26-4R/);
    expect(m).not.toBeNull();
    const [lotB10, restB10] = [Number(m![1].replace(/,/g, "")), Number(m![2].replace(/,/g, ""))];
    expect(lotB10).toBeLessThan(restB10 / 2);
    // the same figures as the Life page's lot comparison
    const life = await get<WeibullResponse>("/api/analytics/life/weibull?component=ENG-CSA-HPLUG&compareBy=lot&compareValue=BT-2109&engineFamilies=K26-4R");
    const fitted = life.groups.map((g) => (g.fit.status === "fitted" ? Math.round(g.fit.b10) : null));
    expect(fitted).toEqual([lotB10, restB10]);
    // a finding without a lot has no life comparison
    for (const f of body.findings.filter((x) => x.lead.dimensions.supplierLot === "all")) expect(f.life).toBeNull();
  });

  it("charges no lot to a part other than the heater plug, and reports neither the hose nor the comeback shop as a lot", async () => {
    const body = await get<ClusterList>("/api/analytics/clusters?components=ENG-CSA-HPLUG,ENG-CSA-RELAY,ENG-CSA-GRID,HYD-LIN-HOSE");
    for (const c of body.clusters) {
      if (c.dimensions.component !== "ENG-CSA-HPLUG") expect(["all", "not tracked"]).toContain(c.dimensions.supplierLot);
    }
    // the comeback shop's excess, if any shows, is a shop's, never a lot's
    for (const f of body.findings.filter((x) => x.lead.dimensions.shop === "S5")) expect(f.lead.dimensions.supplierLot).toBe("all");
    // at the system level the parts are counted together and the plug's lot is not charged with them
    const system = await get<ClusterList>("/api/analytics/clusters?level=system");
    expect(system.level).toBe("system");
    for (const c of system.clusters) expect(c.dimensions.supplierLot).toBe("all");
  });

  it("answers 401 without a session and 400 with a filter in words", async () => {
    await request(t.app).get("/api/analytics/clusters").expect(401);
    const res = await request(t.app).get("/api/analytics/clusters?from=2024-13-01").set("Cookie", analyst).expect(400);
    expect(res.body.error.message).toBe("The request is not valid: From: use a date like 2024-01-31");
  });
});

describe("GET /api/analytics/life/weibull on the demo world", () => {
  const lotVsRest = (extra = "") =>
    get<WeibullResponse>(`/api/analytics/life/weibull?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109${extra}`);

  it("fits the lot's scale at 0.22–0.45 of the other K26 lots' with a likelihood-ratio p below 0.01", async () => {
    const body = await lotVsRest();
    expect(body.comparison).not.toBeNull();
    expect(body.comparison!.scaleRatio.estimate).toBeGreaterThan(0.22);
    expect(body.comparison!.scaleRatio.estimate).toBeLessThan(0.45);
    expect(body.comparison!.sameDistribution.pValue).toBeLessThan(0.01);
    const rest = body.groups[1].fit;
    expect(rest.status).toBe("fitted");
  });

  it("gives a lower ratio in the cold shops than in the mild ones", async () => {
    const coldShops = [...cold].join(",");
    const mildShops = ["S5", "S6", "S8"].join(",");
    const c = await lotVsRest(`&shops=${coldShops}`);
    const m = await lotVsRest(`&shops=${mildShops}`);
    expect(c.comparison!.scaleRatio.estimate).toBeLessThan(m.comparison!.scaleRatio.estimate);
  });
});

describe("lot failures by climate on the demo world", () => {
  it("puts at least 58 % of the lot's failures in the cold shops and 1.5× as many per lot machine", async () => {
    const body = await get<KaplanMeierResponse>(
      "/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&lots=BT-2109&compareBy=climate&compareValue=cold&compareOther=mild",
    );
    const [c, m] = body.groups;
    expect(c.failures / (c.failures + m.failures)).toBeGreaterThanOrEqual(0.58);
    // first units only (the build lot) are one per machine, so units with lot BT-2109 ≈ lot machines
    const machines = async (shops: string) =>
      (
        await t.db
          .selectFrom("dim_machine as m")
          .innerJoin("dim_shop as s", "s.shop_key", "m.home_shop_key")
          .select((eb) => eb.fn.countAll<string>().as("n"))
          .where("m.heater_plug_lot", "=", "BT-2109")
          .where("s.shop_code", "in", shops.split(","))
          .executeTakeFirstOrThrow()
      ).n;
    // the scenario's mild shops are S5, S6 and S8 (S4 is neither cold nor mild)
    const mild = await get<KaplanMeierResponse>("/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&lots=BT-2109&shops=S5,S6,S8");
    const perMachineCold = c.failures / Number(await machines([...cold].join(",")));
    const perMachineMild = mild.groups[0].failures / Number(await machines("S5,S6,S8"));
    expect(perMachineCold / perMachineMild).toBeGreaterThanOrEqual(1.5);
  });
});

describe("GET /api/analytics/rates/temperature-bands on the demo world", () => {
  const rates = (component: string, families: string) =>
    get<TemperatureBandRates>(`/api/analytics/rates/temperature-bands?components=${component}&engineFamilies=${families}&unit=F`);
  const perBand = (body: TemperatureBandRates) => Object.fromEntries(body.rows.map((r) => [r.band, r]));
  const pooled = (rows: TemperatureBandRates["rows"]) => rows.reduce((s, r) => s + r.failures, 0) / rows.reduce((s, r) => s + r.machineDays, 0);

  it("shows heater-plug failures at least 10× as often below 20 °F as at 45 °F and above, rising up to 0–20 °F", async () => {
    const b = perBand(await rates("ENG-CSA-HPLUG", "K18-3G,K26-4R"));
    const below20 = pooled([b["below-0F"], b["0-20F"]]);
    const warm = pooled([b["45F-up"]]);
    expect(below20 / warm).toBeGreaterThanOrEqual(10);
    const r = (id: string) => b[id].perThousandMachineDays!.rate;
    expect(r("45F-up")).toBeLessThan(r("32-45F"));
    expect(r("32-45F")).toBeLessThan(r("20-32F"));
    expect(r("20-32F")).toBeLessThan(r("0-20F"));
  });

  it("shows no such rise for a control component without a cold effect (alternator)", async () => {
    const b = perBand(await rates("ELE-PWR-ALT", "K18-3G,K26-4R,K38-4H"));
    const ratio = pooled([b["below-0F"], b["0-20F"]]) / pooled([b["45F-up"]]);
    expect(ratio).toBeGreaterThan(0.5);
    expect(ratio).toBeLessThan(2);
  });
});

describe("GET /api/analytics/life/mcf on the demo world", () => {
  it("recovers the hydraulic-hose repair rate the scenario plants (exponential, η 3,000 h → about 0.33 per 1,000 h)", async () => {
    // SCENARIO.md: hose failures are a renewal process with β 1.0, η 3,000 h, so repairs per 1,000 h ≈ 1000/3000;
    // comebacks for the same fault add a little on top.
    const body = await get<McfResponse>("/api/analytics/life/mcf?component=HYD-LIN-HOSE");
    const g = body.groups[0];
    expect(g.machines).toBeGreaterThan(3000);
    expect(g.slopePerThousandHours).toBeGreaterThan(0.25);
    expect(g.slopePerThousandHours).toBeLessThan(0.45);
    expect(g.steps.every((s, i, a) => i === 0 || s.mcf >= a[i - 1].mcf)).toBe(true);
  });
});

describe("shop scope on the analytics routes", () => {
  it("counts only the manager's shop in the clusters and the rates", async () => {
    const manager = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
    const own = await get<ClusterList>("/api/analytics/clusters", manager);
    for (const c of own.clusters) expect(["S5", "all"]).toContain(c.dimensions.shop);
    const ids = own.clusters.flatMap((c) => c.repairLineIds);
    if (ids.length) {
      const shops = await t.db
        .selectFrom("fact_repair_line as f")
        .innerJoin("dim_machine as m", "m.machine_key", "f.machine_key")
        .innerJoin("dim_shop as s", "s.shop_key", "m.home_shop_key")
        .select("s.shop_code")
        .distinct()
        .where("f.repair_line_key", "in", ids as never[])
        .execute();
      expect(shops.map((s) => s.shop_code)).toEqual(["S5"]);
    }
    const mine = await get<TemperatureBandRates>("/api/analytics/rates/temperature-bands", manager);
    const all = await get<TemperatureBandRates>("/api/analytics/rates/temperature-bands");
    const days = (b: TemperatureBandRates) => b.rows.reduce((s, r) => s + r.machineDays, 0);
    expect(days(mine)).toBeLessThan(days(all) / 4);
    expect(days(mine)).toBeGreaterThan(0);
  });
});
