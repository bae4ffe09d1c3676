import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import { temperatureBandRatesSchema, type TemperatureBandRates } from "../../shared/schemas/analytics-rates.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";

// The temperature bands follow the unit the user reads in (°C on round Celsius values, °F on round Fahrenheit
// ones) while the warehouse stores one finer partition both are sums of. On the demo world: the °C answer has
// the round edges, both units share out the same machine-days and failures, and a band filter selects the
// days of its band whatever unit the answer is grouped in. The edges are checked against t/°C = (t/°F − 32)/1.8
// (NIST SP 811, B.8) in tests/unit/shared/bands.test.ts.

let t: TestApp;
let analyst: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const HPLUG = "components=ENG-CSA-HPLUG";
const rates = async (search: string): Promise<TemperatureBandRates> =>
  temperatureBandRatesSchema.parse((await request(t.app).get(apiPaths.rates("temperature-bands", search)).set("Cookie", analyst).expect(200)).body);
const total = (d: TemperatureBandRates) => ({
  failures: d.rows.reduce((s, r) => s + r.failures, 0),
  machineDays: d.rows.reduce((s, r) => s + r.machineDays, 0),
  engineHours: d.rows.reduce((s, r) => s + r.engineHours, 0),
});
const row = (d: TemperatureBandRates, band: string) => d.rows.find((r) => r.band === band)!;

describe("GET /api/analytics/rates/temperature-bands?unit=C", () => {
  it("answers in the °C bands, coldest first, labelled on round Celsius edges", async () => {
    const c = await rates(`${HPLUG}&unit=C`);
    expect(c.unit).toBe("C");
    expect(c.rows.slice(0, 5).map((r) => [r.band, r.label])).toEqual([
      ["below-minus20C", "below −20 °C"],
      ["minus20-minus10C", "−20 to −10 °C"],
      ["minus10-0C", "−10 to 0 °C"],
      ["0-5C", "0 to 5 °C"],
      ["5C-up", "5 °C and above"],
    ]);
    expect(c.rows.slice(5).map((r) => r.band)).toEqual(c.rows.length > 5 ? ["unknown"] : []);
    // the default unit is °C
    expect((await rates(HPLUG)).rows.map((r) => r.band)).toEqual(c.rows.map((r) => r.band));
  });

  it("shares out the same machine-days, engine hours and failures as the °F bands", async () => {
    const c = total(await rates(`${HPLUG}&unit=C`));
    const f = total(await rates(`${HPLUG}&unit=F`));
    expect(c.failures).toBe(f.failures);
    expect(c.machineDays).toBe(f.machineDays);
    expect(c.engineHours).toBeCloseTo(f.engineHours, 3);
    expect(c.failures).toBeGreaterThan(100);
  });

  it("counts a °C band's machine-days from the stored rows whose daily minima lie between its edges", async () => {
    const c = await rates(`${HPLUG}&unit=C`);
    // the stored storage bands of −10 to 0 °C, picked by their °C edges in SQL rather than by the module's mapping
    const stored = await t.pool.query<{ days: string }>(`
      SELECT sum(machine_days)::text AS days FROM agg_exposure_fleet
      WHERE temp_band IN ('minus10C-20F', '20F-0C')`);
    expect(row(c, "minus10-0C").machineDays).toBe(Number(stored.rows[0].days));
    // and every stored day is in one °C row
    const all = await t.pool.query<{ days: string }>(`SELECT sum(machine_days)::text AS days FROM agg_exposure_fleet`);
    expect(total(c).machineDays).toBe(Number(all.rows[0].days));
  });

  it("puts the same failures and days below 0 °C in the °C bands as below 32 °F in the °F bands (0 °C = 32 °F, NIST SP 811 B.8)", async () => {
    const c = await rates(`${HPLUG}&unit=C`);
    const f = await rates(`${HPLUG}&unit=F`);
    const sum = (d: TemperatureBandRates, bands: string[], k: "failures" | "machineDays") => bands.reduce((s, b) => s + row(d, b)[k], 0);
    for (const k of ["failures", "machineDays"] as const) {
      expect(sum(c, ["below-minus20C", "minus20-minus10C", "minus10-0C"], k)).toBe(sum(f, ["below-0F", "0-20F", "20-32F"], k));
      expect(sum(c, ["0-5C", "5C-up"], k)).toBe(sum(f, ["32-45F", "45F-up"], k));
    }
  });
});

describe("GET /api/analytics/rates/temperature-bands with a tempBands filter", () => {
  it("selects, for a °C band, the exposure and failures of its row of the unfiltered answer", async () => {
    const all = await rates(`${HPLUG}&unit=C`);
    for (const band of ["minus20-minus10C", "0-5C"]) {
      const one = await rates(`${HPLUG}&unit=C&tempBands=${band}`);
      expect(total(one)).toEqual({ failures: row(all, band).failures, machineDays: row(all, band).machineDays, engineHours: expect.closeTo(row(all, band).engineHours, 3) });
      // the same days grouped in °F: spread over the °F bands it overlaps, the same sums
      const inF = await rates(`${HPLUG}&unit=F&tempBands=${band}`);
      expect(total(inF).machineDays).toBe(row(all, band).machineDays);
      expect(total(inF).failures).toBe(row(all, band).failures);
    }
  });

  it("selects, for two °C bands together, the sum of their rows", async () => {
    const all = await rates(`${HPLUG}&unit=C`);
    const two = await rates(`${HPLUG}&unit=C&tempBands=below-minus20C,minus10-0C`);
    expect(total(two).machineDays).toBe(row(all, "below-minus20C").machineDays + row(all, "minus10-0C").machineDays);
    expect(total(two).failures).toBe(row(all, "below-minus20C").failures + row(all, "minus10-0C").failures);
  });

  it("refuses a band id of neither unit in words", async () => {
    const res = await request(t.app).get(apiPaths.rates("temperature-bands", "tempBands=minus5C")).set("Cookie", analyst).expect(400);
    expect(res.body.error.message).toMatch(/tempBands/);
  });
});

describe("GET /api/analytics/clusters in either unit", () => {
  it("scans in the unit's bands and keeps a finding's key whichever unit it is read in", async () => {
    const get = async (unit: string) => (await request(t.app).get(apiPaths.clusters(`unit=${unit}`)).set("Cookie", analyst).expect(200)).body as ClusterList;
    const [c, f] = [await get("C"), await get("F")];
    const bands = (l: ClusterList) => new Set(l.clusters.map((x) => x.dimensions.temperatureBand).filter((b) => b !== "all" && b !== "unknown"));
    expect(bands(c).size).toBeGreaterThan(0);
    expect(bands(f).size).toBeGreaterThan(0);
    expect([...bands(c)].every((b) => b.endsWith("C"))).toBe(true);
    expect([...bands(f)].every((b) => b.endsWith("F"))).toBe(true);
    // the planted lot leads in both, under one key
    expect(c.findings[0].key).toBe(f.findings[0].key);
    // a band in a key is its place in its set (coldest = 1), never a unit's id
    for (const x of [...c.findings, ...f.findings]) {
      if (x.key.includes("temp=")) expect(x.key).toMatch(/(^|;)temp=([1-5]|unknown)(;|$)/);
    }
  });
});
