import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile, refreshExposure } from "../../etl/index.js";
import { apiPaths } from "../../shared/api-paths.js";
import { kaplanMeierResponseSchema } from "../../shared/schemas/analytics-life.js";
import { temperatureBandRatesSchema, type TemperatureBandRates } from "../../shared/schemas/analytics-rates.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { fixture, TODAY } from "../etl/helpers.js";

// GET /api/analytics/rates/temperature-bands for a machine that moved to another home shop: its failures and
// machine-days count at the shop it was homed at on the day, with that shop's daily minimum. KDLV-20001 (the only
// machine of model line DLV) is at S4 until 2024-01-14 and at S5 from 2024-01-15 (a machines export with
// home_shop_since). S4's every day is −25 °C (below 0 °F), S5's +15 °C (45 °F and up), 2023-11-01 to 2024-04-30.
// It fails on 2024-01-05 (at S4) and on 2024-02-10 (at S5); both lines were repaired at S4, which does not matter:
// rates count by home shop, not by the shop that did the work.

const dir = mkdtempSync(path.join(os.tmpdir(), "home-shop-moves-api-"));
const write = (name: string, lines: string[]) => {
  const file = path.join(dir, name);
  writeFileSync(file, lines.join("\n") + "\n");
  return file;
};
const header = (f: string) => readFileSync(fixture(f), "utf8").split("\n")[0];

function everyDay(shop: string, from: string, to: string, tmin: number): string[] {
  const out: string[] = [];
  for (let t = Date.parse(`${from}T00:00:00Z`); t <= Date.parse(`${to}T00:00:00Z`); t += 86_400_000) {
    out.push(`${shop},${new Date(t).toISOString().slice(0, 10)},${tmin},${tmin + 8}`);
  }
  return out;
}
const job = (ro: string, day: string, hours: number, component: string) =>
  `S4,${ro},1,KDLV-20001,${day},${day},${hours},,Complaint,Cause,Correction,${component},WEAR,,1.0,1.0,40.00,110.00,customer,failure,S4-T1,,,,,,,N,,`;

let t: TestApp;
let analyst: string;
let managerS5: string;

beforeAll(async () => {
  t = await testApp();
  analyst = await t.signInAs({ roles: ["analyst"] });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
  const files = [
    fixture("machines.csv"),
    write("weather.csv", ["shop_code,date,tmin,tmax", ...everyDay("S4", "2023-11-01", "2024-04-30", -25), ...everyDay("S5", "2023-11-01", "2024-04-30", 15)]),
    write("hours.csv", ["serial,reading_date,hours,source,meter_note", "KDLV-20001,2023-11-01,3800,telematics,", "KDLV-20001,2024-04-01,4400,telematics,"]),
    write("jobs.csv", [header("jobs-export-1.csv"), job("M-1", "2024-01-05", 4056, "HYD-LIN-HOSE"), job("M-2", "2024-02-10", 4198, "ELE-PWR-ALT")]),
    write("machines-move.csv", [
      `${header("machines.csv")},home_shop_since`,
      "KDLV-20001,DLV,E26-60001,2021-10-04,2021-12-01,1.5,S5,BT-2109,N,,24,2000,36,3000,2024-01-15",
    ]),
  ];
  for (const file of files) await loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY });
  await refreshExposure(t.db);
}, 120_000);
afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

async function bands(search: string, cookie = analyst): Promise<Record<string, { failures: number; machineDays: number }>> {
  // in °F bands, the ones these figures were written in
  const res = await request(t.app).get(apiPaths.rates("temperature-bands", `${search}&unit=F`)).set("Cookie", cookie).expect(200);
  const body: TemperatureBandRates = temperatureBandRatesSchema.parse(res.body);
  return Object.fromEntries(
    body.rows.filter((r) => r.failures > 0 || r.machineDays > 0).map((r) => [r.band, { failures: r.failures, machineDays: r.machineDays }]),
  );
}

const BEFORE = { failures: 1, machineDays: 75 }; // 2023-11-01 … 2024-01-14 at S4, with S4's weather
const AFTER = { failures: 1, machineDays: 77 }; // 2024-01-15 … 2024-03-31 (the last reading) at S5, with S5's weather
const WITHOUT_WEATHER = { failures: 0, machineDays: 700 }; // delivery (2021-12-01) … 2023-10-31 at S4, no weather rows

describe("GET /api/analytics/rates/temperature-bands for a machine that moved", () => {
  it("counts the failure and the days before the move at the old shop, in that shop's weather band", async () => {
    expect(await bands("modelLines=DLV&shops=S4")).toEqual({ "below-0F": BEFORE, unknown: WITHOUT_WEATHER });
  });

  it("counts the failure and the days from the move at the new shop, in that shop's weather band", async () => {
    expect(await bands("modelLines=DLV&shops=S5")).toEqual({ "45F-up": AFTER });
  });

  it("counts both shops' share once in the group's figures", async () => {
    expect(await bands("modelLines=DLV")).toEqual({ "below-0F": BEFORE, "45F-up": AFTER, unknown: WITHOUT_WEATHER });
  });

  it("shows a manager of the new shop only the days and failures since the move", async () => {
    expect(await bands("modelLines=DLV", managerS5)).toEqual({ "45F-up": AFTER });
  });
});

describe("GET /api/analytics/life/kaplan-meier for a machine that moved", () => {
  // a life follows the machine: its units count at its current home shop with every failure of its history
  const km = async (search: string) =>
    kaplanMeierResponseSchema.parse((await request(t.app).get(apiPaths.life("kaplan-meier", search)).set("Cookie", analyst).expect(200)).body);

  it("ends the machine's first hose at the failure it had before the move, under its current home shop", async () => {
    const [now] = (await km("component=HYD-LIN-HOSE&modelLines=DLV&shops=S5")).groups;
    expect(now).toMatchObject({ units: 2, failures: 1 });
  });

  it("shows no unit of the machine under the shop it left", async () => {
    expect((await km("component=HYD-LIN-HOSE&modelLines=DLV&shops=S4")).groups.every((g) => g.units === 0)).toBe(true);
  });
});
