import type pg from "pg";

export interface ShopInput {
  code: string;
  name: string;
  region?: string | null;
  town?: string | null;
  lat?: number | null;
  lon?: number | null;
  climateZone?: string | null;
  timeZone?: string | null;
  weatherStation?: string | null;
  /** id of the profile this shop's exports use (etl/profiles/<id>.json) */
  exportProfile?: string | null;
}

/**
 * Registers or updates shops in dim_shop (keyed by code). Loads also add a bare row for a shop code they
 * meet first; this fills in its name, place and climate.
 */
export async function upsertShops(pool: pg.Pool, shops: ShopInput[]): Promise<void> {
  if (shops.length === 0) return;
  const col = <K extends keyof ShopInput>(k: K) => shops.map((s) => s[k] ?? null);
  await pool.query(
    `INSERT INTO dim_shop (shop_key, shop_code, name, region, town, lat, lon, climate_zone, time_zone, weather_station, export_profile)
     SELECT wh_key('shop|' || upper(trim(code))), upper(trim(code)), name, region, town, lat, lon, climate_zone, time_zone, weather_station, export_profile
     FROM unnest($1::text[], $2::text[], $3::text[], $4::text[], $5::float8[], $6::float8[], $7::text[], $8::text[], $9::text[], $10::text[])
       AS t(code, name, region, town, lat, lon, climate_zone, time_zone, weather_station, export_profile)
     ON CONFLICT (shop_code) DO UPDATE SET name = excluded.name, region = excluded.region, town = excluded.town, lat = excluded.lat,
       lon = excluded.lon, climate_zone = excluded.climate_zone, time_zone = excluded.time_zone,
       weather_station = excluded.weather_station, export_profile = excluded.export_profile`,
    [col("code"), col("name"), col("region"), col("town"), col("lat"), col("lon"), col("climateZone"), col("timeZone"), col("weatherStation"), col("exportProfile")],
  );
}
