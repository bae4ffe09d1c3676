import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { refreshExposure } from "../../etl/derived/refresh-exposure.js";
import { loadFile } from "../../etl/load/load-file.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { fixture, rejectsOf, TODAY } from "./helpers.js";

/**
 * A machine that moves to another home shop keeps its history (machine_home_shop): its machine-days before
 * the move count at the old shop with that shop's weather, from the move's day at the new one. KDLV-20001
 * (home shop S4 in machines.csv) moves to S5 on 2024-01-15. The weather makes the shop of each day visible in
 * its band: every day of S4 is −25 °C (below 0 °F), every day of S5 +15 °C (45 °F and up), from 2023-11-01
 * to 2024-04-30. Its trail runs from delivery (2021-12-01) to the last reading (2024-04-01), so before the move
 * it has 774 days at S4 (75 of them with S4's weather, the rest without a weather row: "unknown"), and after it
 * 77 days at S5, all with S5's weather.
 */

const dir = mkdtempSync(path.join(os.tmpdir(), "home-shop-moves-"));
const write = (name: string, lines: string[]) => {
  const file = path.join(dir, name);
  writeFileSync(file, lines.join("\n") + "\n");
  return file;
};
const MACHINES_HEADER = readFileSync(fixture("machines.csv"), "utf8").split("\n")[0];
const KDLV = (shop: string) => `KDLV-20001,DLV,E26-60001,2021-10-04,2021-12-01,1.5,${shop},BT-2109,N,,24,2000,36,3000`;
const KSKL = "KSKL-20002,SKL,E26-60002,2022-02-14,2022-04-20,2.0,S4,QL-2201,N,,24,2000,36,3000";
const KWRN = "KWRN-20003,WRN,E18-60003,2022-05-02,2022-06-30,0.8,S5,QL-2204,Y,2022-06-30,24,2000,36,3000";

function everyDay(shop: string, from: string, to: string, tmin: number): string[] {
  const out: string[] = [];
  for (let t = Date.parse(`${from}T00:00:00Z`); t <= Date.parse(`${to}T00:00:00Z`); t += 86_400_000) {
    out.push(`${shop},${new Date(t).toISOString().slice(0, 10)},${tmin},${tmin + 8}`);
  }
  return out;
}
const daysBetween = (a: string, b: string) => (Date.parse(b) - Date.parse(a)) / 86_400_000;

const moveFile = write("machines-move.csv", [`${MACHINES_HEADER},home_shop_since`, `${KDLV("S5")},2024-01-15`, `${KSKL},`, `${KWRN},`]);

let t: TestDb;

/** KDLV-20001's share of the exposure by shop and temperature band (agg_exposure_machine; the stored storage band). */
async function kdlvExposure(): Promise<Record<string, { days: number; hours: number }>> {
  const r = await t.pool.query<{ shop: string; band: string; days: number; hours: number }>(
    `SELECT s.shop_code AS shop, c.temp_band AS band, sum(c.machine_days)::int AS days, sum(c.engine_hours) AS hours
     FROM agg_exposure_machine c JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = c.shop_key
     WHERE m.serial = 'KDLV20001' GROUP BY 1, 2 ORDER BY 1, 2`,
  );
  return Object.fromEntries(r.rows.map((x) => [`${x.shop} ${x.band}`, { days: x.days, hours: x.hours }]));
}

/** The exposure the rates read (agg_exposure, and the fleet table beside it) for KDLV-20001's model line, by shop and band. */
async function dlvAggregate(table: "agg_exposure" | "agg_exposure_fleet"): Promise<Record<string, number>> {
  const r = await t.pool.query<{ shop: string; band: string; days: number }>(
    `SELECT s.shop_code AS shop, e.temp_band AS band, sum(e.machine_days)::int AS days
     FROM ${table} e JOIN dim_shop s ON s.shop_key = e.shop_key WHERE e.model_line = 'DLV' GROUP BY 1, 2 ORDER BY 1, 2`,
  );
  return Object.fromEntries(r.rows.map((x) => [`${x.shop} ${x.band}`, x.days]));
}

async function periods(serial = "KDLV20001") {
  const r = await t.pool.query(
    `SELECT s.shop_code AS shop, h.valid_from::text AS valid_from, h.valid_to::text AS valid_to
     FROM machine_home_shop h JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = h.shop_key
     WHERE m.serial = $1 ORDER BY h.valid_from`,
    [serial],
  );
  return r.rows;
}

const homeShop = async (serial: string) =>
  (await t.pool.query(`SELECT s.shop_code FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key WHERE m.serial = $1`, [serial])).rows[0]
    ?.shop_code;

const total = (x: Record<string, { days: number; hours: number }>) =>
  Object.values(x).reduce((a, v) => ({ days: a.days + v.days, hours: a.hours + v.hours }), { days: 0, hours: 0 });

let before: Record<string, { days: number; hours: number }>;

beforeAll(async () => {
  t = await freshTestDb();
  const load = (file: string) => loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY });
  await load(fixture("machines.csv"));
  await load(write("weather.csv", ["shop_code,date,tmin,tmax", ...everyDay("S4", "2023-11-01", "2024-04-30", -25), ...everyDay("S5", "2023-11-01", "2024-04-30", 15)]));
  await load(write("hours.csv", ["serial,reading_date,hours,source,meter_note", "KDLV-20001,2023-11-01,3800,telematics,", "KDLV-20001,2024-04-01,4400,telematics,"]));
  await refreshExposure(t.db);
  before = await kdlvExposure();
});
afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe("a machines export that gives a machine another home shop", () => {
  it("starts every machine with one home shop from -infinity, the shop of all its days", async () => {
    expect(await periods()).toEqual([{ shop: "S4", valid_from: "-infinity", valid_to: null }]);
    const untilLastReading = daysBetween("2021-12-01", "2024-04-01");
    expect(before).toEqual({
      "S4 below-minus20C": { days: 152, hours: expect.closeTo(152 * (600 / 152), 6) },
      "S4 unknown": { days: untilLastReading - 152, hours: expect.any(Number) },
    });
  });

  it("closes the current home shop on the row's home shop since and opens the new one, counted as one updated machine", async () => {
    const s = await loadFile(t.pool, { path: moveFile, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ status: "loaded", read: 3, inserted: 0, updated: 1, unchanged: 2, rejected: 0 });
    expect(await periods()).toEqual([
      { shop: "S4", valid_from: "-infinity", valid_to: "2024-01-15" },
      { shop: "S5", valid_from: "2024-01-15", valid_to: null },
    ]);
    expect(await homeShop("KDLV20001")).toBe("S5");
    // the machines that stayed keep their one period
    expect(await periods("KSKL20002")).toEqual([{ shop: "S4", valid_from: "-infinity", valid_to: null }]);
  });

  it("counts the days before the move at the old shop with its weather and the days from it at the new one, the total unchanged", async () => {
    const r = await refreshExposure(t.db);
    expect(r.mode).toBe("incremental");
    const after = await kdlvExposure();
    const atS5 = daysBetween("2024-01-15", "2024-04-01");
    expect(after).toEqual({
      "S4 below-minus20C": { days: daysBetween("2023-11-01", "2024-01-15"), hours: expect.any(Number) },
      "S4 unknown": { days: before["S4 unknown"].days, hours: expect.closeTo(before["S4 unknown"].hours, 6) },
      "S5 45F-up": { days: atS5, hours: expect.closeTo(atS5 * (600 / 152), 6) },
    });
    expect(total(after).days).toBe(total(before).days);
    expect(total(after).hours).toBeCloseTo(total(before).hours, 6);
    // January is split between the shops on the move's day
    const january = await t.pool.query(
      `SELECT s.shop_code AS shop, sum(c.machine_days)::int AS days FROM agg_exposure_machine c
       JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = c.shop_key
       WHERE m.serial = 'KDLV20001' AND c.month = '2024-01-01' GROUP BY 1 ORDER BY 1`,
    );
    expect(january.rows).toEqual([{ shop: "S4", days: 14 }, { shop: "S5", days: 17 }]);
  });

  it("shows the move per shop in the aggregates the rates read, equal to a full rebuild", async () => {
    const expected = {
      "S4 below-minus20C": daysBetween("2023-11-01", "2024-01-15"),
      "S4 unknown": before["S4 unknown"].days,
      "S5 45F-up": daysBetween("2024-01-15", "2024-04-01"),
    };
    expect(await dlvAggregate("agg_exposure")).toEqual(expected);
    expect(await dlvAggregate("agg_exposure_fleet")).toEqual(expected);
    const folded = await kdlvExposure();
    await refreshExposure(t.db, { full: true });
    expect(await dlvAggregate("agg_exposure")).toEqual(expected);
    const rebuilt = await kdlvExposure();
    for (const k of Object.keys(rebuilt)) expect(folded[k].hours).toBeCloseTo(rebuilt[k].hours, 6);
    expect(Object.keys(folded)).toEqual(Object.keys(rebuilt));
  });

  it("changes nothing when the same file comes again, or another file names the same home shop with another date", async () => {
    const again = await loadFile(t.pool, { path: moveFile, loadedBy: "test", today: TODAY });
    expect(again).toMatchObject({ status: "already_loaded", inserted: 0, updated: 0, unchanged: 3 });
    const sameShop = write("machines-same-shop.csv", [`${MACHINES_HEADER},home_shop_since`, `${KDLV("S5")},2024-03-01`, `${KSKL},2023-05-01`]);
    const s = await loadFile(t.pool, { path: sameShop, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ status: "loaded", read: 2, inserted: 0, updated: 0, unchanged: 2, rejected: 0 });
    const withoutDate = await loadFile(t.pool, { path: write("machines-no-date.csv", [MACHINES_HEADER, KDLV("S5"), KWRN]), loadedBy: "test", today: TODAY });
    expect(withoutDate).toMatchObject({ status: "loaded", read: 2, inserted: 0, updated: 0, unchanged: 2, rejected: 0 });
    expect(await periods()).toEqual([
      { shop: "S4", valid_from: "-infinity", valid_to: "2024-01-15" },
      { shop: "S5", valid_from: "2024-01-15", valid_to: null },
    ]);
    const exposed = await kdlvExposure();
    const r = await refreshExposure(t.db);
    expect(r.machines).toBe(0);
    expect(await kdlvExposure()).toEqual(exposed);
  });

  it("rejects a move dated on or before the day the current home shop began, with its line and the reason in words", async () => {
    const file = write("machines-backdated.csv", [`${MACHINES_HEADER},home_shop_since`, `${KSKL},`, `${KDLV("S4")},2024-01-15`, `${KWRN},`]);
    const s = await loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 3, inserted: 0, updated: 0, unchanged: 2, rejected: 1 });
    const [reject] = await rejectsOf(t.pool, s.batchId);
    expect(reject).toMatchObject({ row_number: 3, reason_code: "backdated_move" });
    expect(reject.reason).toBe(
      "moves machine KDLV20001 from S5 to S4 on 2024-01-15 (its home shop since), but it has been at S5 only since 2024-01-15; " +
        "a move dated on or before that day would rewrite where the machine was, so the row was not loaded " +
        "(give a later home shop since, or leave the home shop as it is)",
    );
    expect(reject.raw_row).toMatchObject({ serial: "KDLV-20001", home_shop: "S4", home_shop_since: "2024-01-15" });
    expect(await periods()).toEqual([
      { shop: "S4", valid_from: "-infinity", valid_to: "2024-01-15" },
      { shop: "S5", valid_from: "2024-01-15", valid_to: null },
    ]);
    expect(await homeShop("KDLV20001")).toBe("S5");
  });

  it("dates a move by the load date when the row gives no home shop since, and rejects it when that date is too early", async () => {
    const file = write("machines-undated.csv", [MACHINES_HEADER, KDLV("S4")]);
    const early = await loadFile(t.pool, { path: file, loadedBy: "test", today: "2024-01-10" });
    expect(early).toMatchObject({ read: 1, updated: 0, rejected: 1 });
    const [reject] = await rejectsOf(t.pool, early.batchId);
    expect(reject).toMatchObject({ row_number: 2, reason_code: "backdated_move" });
    expect(reject.reason).toContain("on 2024-01-10 (the load date: the row gives no home shop since)");

    const s = await loadFile(t.pool, { path: write("machines-undated-later.csv", [MACHINES_HEADER, KDLV("S4"), KSKL]), loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 2, updated: 1, unchanged: 1, rejected: 0 });
    expect(await periods()).toEqual([
      { shop: "S4", valid_from: "-infinity", valid_to: "2024-01-15" },
      { shop: "S5", valid_from: "2024-01-15", valid_to: TODAY },
      { shop: "S4", valid_from: TODAY, valid_to: null },
    ]);
    expect(await homeShop("KDLV20001")).toBe("S4");
    // the trail ends long before the load date: the days keep their shops
    const exposed = await kdlvExposure();
    await refreshExposure(t.db);
    expect(await kdlvExposure()).toEqual(exposed);
  });

  it("gives a new machine its home shop from -infinity, whatever home shop since it names", async () => {
    const file = write("machines-new.csv", [`${MACHINES_HEADER},home_shop_since`, "KDLV-20009,DLV,E26-60009,2022-10-04,2022-12-01,1.0,S5,BT-2109,N,,24,2000,36,3000,2023-02-01"]);
    const s = await loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ read: 1, inserted: 1, rejected: 0 });
    expect(await periods("KDLV20009")).toEqual([{ shop: "S5", valid_from: "-infinity", valid_to: null }]);
  });
});
