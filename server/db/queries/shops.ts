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
