import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AdminShop, ShopEdit, ShopEntry } from "../../../shared/schemas/shops-admin.js";
import { scopedShopCodes } from "./scope.js";

/** Every registered shop in the scope, by code, with its home machines and its repair-order lines counted. */
export async function listAdminShops(db: Db, scope: ShopScope): Promise<AdminShop[]> {
  const codes = scopedShopCodes(scope);
  if (codes && codes.length === 0) return [];
  // counted per shop through the indexes on home_shop_key and (shop_key, opened_date), so one shop costs its own rows only
  let q = db
    .selectFrom("dim_shop as s")
    .select((eb) => [
      "s.shop_code", "s.name", "s.region", "s.town", "s.lat", "s.lon", "s.climate_zone", "s.time_zone", "s.weather_station", "s.export_profile",
      eb.selectFrom("dim_machine as m").select((e) => e.fn.countAll<string>().as("n")).whereRef("m.home_shop_key", "=", "s.shop_key").as("machines"),
      eb.selectFrom("fact_repair_line as l").select((e) => e.fn.countAll<string>().as("n")).whereRef("l.shop_key", "=", "s.shop_key").as("lines"),
    ])
    .orderBy("s.shop_code");
  if (codes) q = q.where("s.shop_code", "in", codes);
  const rows = await q.execute();
  return rows.map((r) => ({
    code: r.shop_code,
    name: r.name,
    region: r.region,
    town: r.town,
    lat: r.lat,
    lon: r.lon,
    climateZone: r.climate_zone,
    timeZone: r.time_zone,
    weatherStation: r.weather_station,
    exportProfile: r.export_profile,
    machines: Number(r.machines ?? 0),
    repairLines: Number(r.lines ?? 0),
  }));
}

const columns = (s: ShopEdit) => ({
  name: s.name,
  region: s.region,
  town: s.town,
  lat: s.lat,
  lon: s.lon,
  climate_zone: s.climateZone,
  time_zone: s.timeZone,
  weather_station: s.weatherStation,
  export_profile: s.exportProfile,
});

/**
 * Registers a new shop, its key made from its code as loads make it (wh_key('shop|' || code)). False, and
 * nothing written, when the code is taken (a shop a load added bare is registered already: edit it).
 */
export async function insertShop(db: Db, s: ShopEntry): Promise<boolean> {
  const made = await db
    .insertInto("dim_shop")
    .values({ shop_key: sql<string>`wh_key(${`shop|${s.code}`})`, shop_code: s.code, ...columns(s) })
    .onConflict((oc) => oc.column("shop_code").doNothing())
    .returning("shop_code")
    .executeTakeFirst();
  return made !== undefined;
}

/** Rewrites everything but the code of a registered shop. False when no shop has that code. */
export async function updateShop(db: Db, code: string, s: ShopEdit): Promise<boolean> {
  const r = await db.updateTable("dim_shop").set(columns(s)).where("shop_code", "=", code).executeTakeFirst();
  return r.numUpdatedRows > 0n;
}

/** One shop as the admin list shows it, or undefined. */
export async function getAdminShop(db: Db, scope: ShopScope, code: string): Promise<AdminShop | undefined> {
  const codes = scopedShopCodes(scope);
  if (codes && !codes.includes(code)) return undefined;
  return (await listAdminShops(db, { kind: "shops", shops: [code] }))[0];
}
