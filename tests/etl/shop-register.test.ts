import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile } from "../../etl/load/load-file.js";
import { readShopRegister } from "../../etl/shops/read-register.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb, fixture, runEtlCli, sample as sampleFile, TODAY } from "./helpers.js";

const sample = sampleFile("shop-register.csv");


function registerFile(lines: string[]): string {
  const file = path.join(mkdtempSync(path.join(os.tmpdir(), "shop-register-")), "shops.csv");
  writeFileSync(file, lines.join("\n") + "\n");
  return file;
}

describe("readShopRegister", () => {
  it("reads the sample register", async () => {
    const r = await readShopRegister(sample);
    expect(r.errors).toEqual([]);
    expect(r.shops.map((s) => s.code)).toEqual(["S1", "S4", "S8"]);
    expect(r.shops[1]).toMatchObject({ code: "S4", lat: null, lon: null, timeZone: "America/Chicago", exportProfile: "alder-jobs" });
  });

  it("names every wrong row with its line and the problem in words", async () => {
    const r = await readShopRegister(
      registerFile([
        "code,name,lat,lon,time_zone,export_profile",
        "s9,Ninth shop,95,10,Europe/Oslo,",
        "S10,,1,1,,",
        "S11,Eleventh,north,1,Mars/Olympus,no-such-profile",
        "S9,Again,1,1,,",
        "S12,Short row",
      ]),
    );
    expect(r.errors).toEqual([
      "line 2: latitude must lie between -90 and 90",
      "line 3: name is blank",
      "line 4: latitude is not a number; time zone is not an IANA name such as Europe/Oslo; export profile is not one of etl/profiles",
      "line 6: 2 fields but the header has 6",
    ]);
    // line 5 repeats S9, whose own row (line 2) was wrong: it is read, not reported as a repeat
    expect(r.shops.map((s) => s.code)).toEqual(["S9"]);
  });

  it("refuses a header without code and name", async () => {
    await expect(readShopRegister(registerFile(["shop,town", "S1,X"]))).rejects.toThrow(/at least the columns code and name/);
  });
});

describe("npm run etl -- shops", () => {
  let t: TestDb;
  beforeAll(async () => {
    t = await freshTestDb();
  });
  afterAll(async () => dropTestDb(t));

  it("fills in a shop a load created bare, and lists it", async () => {
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
    const before = await t.pool.query(`SELECT name, climate_zone FROM dim_shop WHERE shop_code = 'S4'`);
    expect(before.rows).toEqual([{ name: "S4", climate_zone: null }]);

    const r = await runEtlCli(t.url, ["shops", "register", sample]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/3 shops registered \(S1, S4, S8\)/);
    const after = await t.pool.query(`SELECT shop_key, name, climate_zone, time_zone FROM dim_shop WHERE shop_code = 'S4'`);
    expect(after.rows).toHaveLength(1);
    expect(after.rows[0]).toMatchObject({ name: "Lindqvale service shop", climate_zone: "cool continental", time_zone: "America/Chicago" });

    const list = await runEtlCli(t.url, ["shops", "list", "--json"]);
    const codes = list.stdout.trim().split("\n").map((l) => JSON.parse(l).code);
    expect(codes).toEqual(expect.arrayContaining(["S1", "S4", "S8"]));
  });

  it("registers nothing and exits non-zero when a row is wrong", async () => {
    const file = registerFile(["code,name,time_zone", "S20,Twentieth,Europe/Oslo", "S21,Twenty-first,Nowhere/Else"]);
    const r = await runEtlCli(t.url, ["shops", "register", file]);
    expect(r.code).not.toBe(0);
    expect(r.stderr).toMatch(/nothing was registered/);
    expect(r.stderr).toMatch(/line 3: time zone is not an IANA name/);
    const n = await t.pool.query(`SELECT count(*)::int AS n FROM dim_shop WHERE shop_code IN ('S20', 'S21')`);
    expect(n.rows[0].n).toBe(0);
  });
});
