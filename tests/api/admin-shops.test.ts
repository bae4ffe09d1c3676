import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile } from "../../etl/index.js";
import { apiPaths } from "../../shared/api-paths.js";
import type { Role } from "../../shared/roles.js";
import { adminShopListSchema, type AdminShop } from "../../shared/schemas/shops-admin.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { fixture, TODAY } from "../etl/helpers.js";

// The shop register kept from the browser: an administrator lists, adds and edits shops under the rules
// the register file is checked by (tests/etl/shop-register.test.ts); every other role is refused.

const ORIGIN = "http://127.0.0.1:8080";

let t: TestApp;
let admin: string;

const post = (cookie: string, body: unknown) => request(t.app).post(apiPaths.adminShops()).set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);
const put = (cookie: string, code: string, body: unknown) => request(t.app).put(apiPaths.adminShop(code)).set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);
const list = async () => adminShopListSchema.parse((await request(t.app).get(apiPaths.adminShops()).set("Cookie", admin).expect(200)).body);
const stored = async (code: string) => (await t.pool.query(`SELECT shop_key::text, name, region, town, lat, lon, climate_zone, time_zone, weather_station, export_profile FROM dim_shop WHERE shop_code = $1`, [code])).rows;

const westTestShop = {
  code: "fh-2",
  name: "West test shop",
  region: "West",
  town: "Testtown West",
  lat: 47.25,
  lon: "-122.5",
  climateZone: "marine west coast",
  timeZone: "America/Los_Angeles",
  weatherStation: "WTS-01",
  exportProfile: "generic-jobs",
};

beforeAll(async () => {
  t = await testApp();
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin" });
  // a machine master adds S4 and S5 bare; the jobs export gives them repair lines
  for (const f of ["machines.csv", "jobs-export-1.csv"]) await loadFile(t.pool, { path: fixture(f), loadedBy: "test", today: TODAY });
}, 120_000);
afterAll(async () => t?.drop());

describe("GET /api/admin/shops", () => {
  it("lists every shop with its machines and repair lines counted, and the profiles a shop may name", async () => {
    const body = await list();
    const counts = await t.pool.query<{ code: string; machines: number; lines: number }>(`
      SELECT s.shop_code AS code,
             (SELECT count(*)::int FROM dim_machine m WHERE m.home_shop_key = s.shop_key) AS machines,
             (SELECT count(*)::int FROM fact_repair_line l WHERE l.shop_key = s.shop_key) AS lines
      FROM dim_shop s ORDER BY s.shop_code`);
    expect(counts.rows.map((r) => r.code)).toEqual(["S4", "S5"]);
    expect(body.shops.map((s) => [s.code, s.machines, s.repairLines])).toEqual(counts.rows.map((r) => [r.code, r.machines, r.lines]));
    expect(body.shops[0]).toMatchObject({ code: "S4", name: "S4", machines: 2, region: null, timeZone: null, exportProfile: null });
    expect(body.shops[0].repairLines).toBeGreaterThan(0);
    expect(body.profiles).toEqual(expect.arrayContaining([{ id: "generic-jobs", kind: "jobs" }, { id: "generic-machines", kind: "machines" }]));
  });

  for (const role of ["analyst", "director", "manager", "clerk"] as Role[]) {
    it(`refuses the ${role} role with 403`, async () => {
      const cookie = await t.signInAs({ roles: [role], shops: ["S4"] });
      const r = await request(t.app).get(apiPaths.adminShops()).set("Cookie", cookie).expect(403);
      expect(r.body.error.code).toBe("forbidden");
    });
  }

  it("answers 401 without a session", async () => {
    await request(t.app).get(apiPaths.adminShops()).expect(401);
  });
});

describe("POST /api/admin/shops", () => {
  it("adds a shop, its code upper-cased and blanks stored as nothing, and lists it", async () => {
    const r = await post(admin, westTestShop).expect(201);
    expect(r.body).toEqual({
      ...westTestShop, code: "FH-2", lon: -122.5, machines: 0, repairLines: 0,
    } satisfies AdminShop);
    const made = await stored("FH-2");
    expect(made).toHaveLength(1);
    expect(made[0]).toMatchObject({ name: "West test shop", lat: 47.25, lon: -122.5, time_zone: "America/Los_Angeles", export_profile: "generic-jobs" });
    // the key a load would give the same code, so a later export of FH-2 finds this shop
    const key = await t.pool.query(`SELECT wh_key('shop|FH-2')::text AS k`);
    expect(made[0].shop_key).toBe(key.rows[0].k);

    const minimal = await post(admin, { code: " Q7 ", name: "  Quarry Bend  ", region: "", lat: "", timeZone: "   " }).expect(201);
    expect(minimal.body).toMatchObject({ code: "Q7", name: "Quarry Bend", region: null, lat: null, timeZone: null, exportProfile: null });
    expect((await list()).shops.map((s) => s.code)).toEqual(["FH-2", "Q7", "S4", "S5"]);
  });

  it("refuses a duplicate code with 409 in words, whatever its case, and changes nothing", async () => {
    const r = await post(admin, { ...westTestShop, code: "Fh-2", name: "Another name" }).expect(409);
    expect(r.body.error.code).toBe("shop_exists");
    expect(r.body.error.message).toMatch(/A shop with the code FH-2 is registered already/);
    expect((await stored("FH-2"))[0].name).toBe("West test shop");
    // a shop a load added bare is registered already too
    const bare = await post(admin, { code: "S5", name: "Fifth" }).expect(409);
    expect(bare.body.error.message).toMatch(/S5 is registered already \(a load may have added it bare\)/);
  });

  const refusals: [string, object, string][] = [
    ["a time zone that is not an IANA name", { code: "T1", name: "Tz", timeZone: "Mars/Olympus" }, "time zone is not an IANA name such as Europe/Oslo"],
    ["an unknown export profile", { code: "T2", name: "Profile", exportProfile: "no-such-profile" }, "export profile is not one of etl/profiles"],
    ["a code with characters a code may not hold", { code: "S/9!", name: "Slash" }, "code must be 1–16 letters, digits, spaces, - or _"],
    ["a code longer than 16 characters", { code: "ABCDEFGHIJKLMNOPQ", name: "Long" }, "code must be 1–16 letters, digits, spaces, - or _"],
    ["a blank name", { code: "T3", name: "  " }, "name is blank"],
    ["a missing code", { name: "No code" }, "code is blank"],
    ["a latitude out of range", { code: "T4", name: "Pole", lat: 91 }, "latitude must lie between -90 and 90"],
    ["a longitude that is not a number", { code: "T5", name: "East", lon: "east" }, "longitude is not a number"],
  ];
  for (const [what, body, words] of refusals) {
    it(`refuses ${what} with 400 validation_failed in words`, async () => {
      const r = await post(admin, body).expect(400);
      expect(r.body.error.code).toBe("validation_failed");
      expect(r.body.error.message).toBe(`The shop was not saved: ${words}.`);
      expect(await stored(((body as { code?: string }).code ?? "").toUpperCase())).toEqual([]);
    });
  }

  it("names every problem of a body at once", async () => {
    const r = await post(admin, { code: "T6", name: "Many", lat: 100, timeZone: "Nowhere/Else", exportProfile: "nope" }).expect(400);
    expect(r.body.error.message).toBe(
      "The shop was not saved: latitude must lie between -90 and 90; time zone is not an IANA name such as Europe/Oslo; export profile is not one of etl/profiles.",
    );
  });

  it("refuses a body that is not an object with 400 in words", async () => {
    const r = await post(admin, ["FH-3"]).expect(400);
    expect(r.body.error).toMatchObject({ code: "validation_failed", message: expect.stringMatching(/send its fields as a JSON object/) });
  });

  for (const role of ["analyst", "director", "manager", "clerk"] as Role[]) {
    it(`refuses the ${role} role with 403 and adds nothing`, async () => {
      const cookie = await t.signInAs({ roles: [role], shops: ["S4"] });
      await post(cookie, { ...westTestShop, code: `R-${role.slice(0, 3)}` }).expect(403);
      expect(await stored(`R-${role.slice(0, 3)}`.toUpperCase())).toEqual([]);
    });
  }
});

describe("PUT /api/admin/shops/:code", () => {
  it("rewrites every field but the code, and blank fields become empty", async () => {
    const r = await put(admin, "S4", { name: "Lindqvale service shop", town: "Lindqvale", lat: "61.5", lon: 17, timeZone: "Europe/Stockholm", exportProfile: "birch-jobs" }).expect(200);
    expect(r.body).toMatchObject({ code: "S4", name: "Lindqvale service shop", town: "Lindqvale", lat: 61.5, lon: 17, timeZone: "Europe/Stockholm", exportProfile: "birch-jobs", machines: 2 });
    expect((await stored("S4"))[0]).toMatchObject({ name: "Lindqvale service shop", time_zone: "Europe/Stockholm", region: null });

    await put(admin, "s4", { name: "Lindqvale", town: "" }).expect(200);
    expect((await stored("S4"))[0]).toMatchObject({ name: "Lindqvale", town: null, lat: null, time_zone: null, export_profile: null });
    expect((await list()).shops.find((s) => s.code === "S4")).toMatchObject({ name: "Lindqvale", machines: 2 });
  });

  it("refuses a change of code with 400 in words; the same code in the body is accepted", async () => {
    const r = await put(admin, "S5", { code: "S6", name: "Moved" }).expect(400);
    expect(r.body.error).toMatchObject({ code: "validation_failed", message: expect.stringMatching(/its code \(S5\) cannot change/) });
    expect(await stored("S6")).toEqual([]);
    expect((await stored("S5"))[0].name).toBe("S5");
    await put(admin, "S5", { code: "s5", name: "Saltmere service shop" }).expect(200);
    expect((await stored("S5"))[0].name).toBe("Saltmere service shop");
  });

  it("refuses a bad time zone and an unknown profile with 400 in words and changes nothing", async () => {
    const tz = await put(admin, "FH-2", { ...westTestShop, code: undefined, timeZone: "Pacific/Atlantis" }).expect(400);
    expect(tz.body.error.message).toBe("The shop was not saved: time zone is not an IANA name such as Europe/Oslo.");
    const profile = await put(admin, "FH-2", { ...westTestShop, code: undefined, exportProfile: "westTestShop-special" }).expect(400);
    expect(profile.body.error.message).toBe("The shop was not saved: export profile is not one of etl/profiles.");
    expect((await stored("FH-2"))[0]).toMatchObject({ time_zone: "America/Los_Angeles", export_profile: "generic-jobs" });
  });

  it("shows a renamed shop in the cached analytics answers at once (the shop register is part of the data version)", async () => {
    const benchmarks = async () => JSON.stringify((await request(t.app).get(apiPaths.benchmarks("shops")).set("Cookie", admin).expect(200)).body);
    const was = (await stored("S4"))[0];
    expect(await benchmarks()).not.toContain("Fourth, renamed");
    await put(admin, "S4", { name: "Fourth, renamed" }).expect(200);
    expect(await benchmarks()).toContain("Fourth, renamed");
    // as it was, for the tests after this one
    await put(admin, "S4", { name: was.name, region: was.region, town: was.town, lat: was.lat, lon: was.lon, climateZone: was.climate_zone, timeZone: was.time_zone, weatherStation: was.weather_station, exportProfile: was.export_profile }).expect(200);
    expect(await benchmarks()).not.toContain("Fourth, renamed");
  });

  it("answers 404 in words for a code no shop has", async () => {
    const r = await put(admin, "ZZ9", { name: "Nobody" }).expect(404);
    expect(r.body.error.message).toMatch(/ZZ9 was not found/);
    expect(await stored("ZZ9")).toEqual([]);
  });

  for (const role of ["analyst", "director", "manager", "clerk"] as Role[]) {
    it(`refuses the ${role} role with 403 and changes nothing`, async () => {
      const cookie = await t.signInAs({ roles: [role], shops: ["S4"] });
      await put(cookie, "S4", { name: `Renamed by ${role}` }).expect(403);
      expect((await stored("S4"))[0].name).toBe("Lindqvale");
    });
  }
});
