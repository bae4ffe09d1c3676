import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { Shop } from "../../../shared/schemas/shops.js";
import { scopedShopCodes } from "./scope.js";

/** The shops a caller may see, by code. A manager gets only their own shops. */
export async function listShops(db: Db, scope: ShopScope): Promise<Shop[]> {
  const codes = scopedShopCodes(scope);
  if (codes && codes.length === 0) return [];
  let q = db
    .selectFrom("dim_shop")
    .select(["shop_code", "name", "region", "town", "climate_zone", "time_zone"])
    .orderBy("shop_code");
  if (codes) q = q.where("shop_code", "in", codes);
  const rows = await q.execute();
  return rows.map((r) => ({
    code: r.shop_code,
    name: r.name,
    region: r.region,
    town: r.town,
    climateZone: r.climate_zone,
    timeZone: r.time_zone,
  }));
}

/**
 * Cold shops: those where at least half of the December–February days have a daily minimum below
 * 20 °F (−6.67 °C), the temperature below which hard starts begin (DOMAIN.md, common practice).
 */
export async function coldShopCodes(db: Db): Promise<Set<string>> {
  const rows = await db
    .selectFrom("fact_weather_day as w")
    .innerJoin("dim_shop as s", "s.shop_key", "w.shop_key")
    .select((eb) => [
      "s.shop_code",
      eb.fn.count<number>("w.date").as("winter_days"),
      eb.fn.count<number>("w.date").filterWhere(eb("w.tmin_c", "<", String(-20 / 3))).as("cold_days"),
    ])
    .where(sql<boolean>`extract(month from w.date) IN (12, 1, 2)`)
    .groupBy("s.shop_code")
    .execute();
  return new Set(rows.filter((r) => Number(r.cold_days) >= 0.5 * Number(r.winter_days)).map((r) => r.shop_code));
}
