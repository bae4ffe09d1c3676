import { sql, type Kysely, type RawBuilder } from "kysely";
import { storageBandSql, UNKNOWN_BAND } from "../../shared/band-sql.js";
import { storageBands } from "../../shared/bands.js";

/**
 * Running counts of weather days per temperature band, per shop: agg_weather_band_days holds one row per
 * shop and day, from the day before the shop's first weather day to its last, with days_through[i] = how
 * many of the shop's days up to and including that day have a daily minimum in storageBands[i − 1]
 * (shared/bands.ts: the partition both units' bands are unions of, banded by the same SQL as the rest of the
 * warehouse). The days of [a, b) in band i
 * are then days_through(b − 1)[i] − days_through(a − 1)[i], each day clamped to the shop's rows (before the
 * first row nothing is counted yet, after the last everything is), and the days of [a, b) with no weather
 * row are what the bands leave over: band "unknown". A shop without any weather has no rows: all unknown.
 * Kept by the exposure refresh: rebuilt whole with the aggregates (so a change of bands takes effect with
 * the next full rebuild), and for a shop whenever a batch changes its weather (a few thousand rows a shop).
 */

const bandIds = storageBands.map((b) => b.id);

/** Rebuilds the rows of the given shops (keys as text), or of every shop. */
export async function rebuildBandDays(db: Kysely<any>, shops: string[] | "all"): Promise<void> {
  const only = shops === "all" ? sql`` : sql`WHERE shop_key = ANY(${shops}::bigint[])`;
  await (shops === "all" ? sql`TRUNCATE agg_weather_band_days` : sql`DELETE FROM agg_weather_band_days ${only}`).execute(db);
  const counts = bandIds.map((id) => sql`count(*) FILTER (WHERE w.band = ${sql.lit(id)}) OVER o`);
  await sql`
    INSERT INTO agg_weather_band_days (shop_key, date, days_through)
    WITH w AS (
      SELECT shop_key, date, ${storageBandSql(sql`tmin_c`)} AS band FROM fact_weather_day ${only}
    ), span AS (
      SELECT shop_key, min(date) - 1 AS lo, max(date) AS hi FROM w GROUP BY shop_key
    )
    SELECT s.shop_key, s.lo + i, ARRAY[${sql.join(counts)}]::integer[]
    FROM span s CROSS JOIN generate_series(0, s.hi - s.lo) AS i
    LEFT JOIN w ON w.shop_key = s.shop_key AND w.date = s.lo + i
    WINDOW o AS (PARTITION BY s.shop_key ORDER BY i)
  `.execute(db);
}

/**
 * FROM-clause joins that split each row of `piece` (columns shop_key, a, b: the days [a, b) at that shop)
 * into its days per storage band, as the columns `band.temp_band` and `band.days` (rows with no day left out).
 */
export function splitByTemperatureBand(piece: RawBuilder<unknown>): RawBuilder<unknown> {
  const days = bandIds.map((_, i) => sql`coalesce(band_to.days_through[${sql.lit(i + 1)}] - band_from.days_through[${sql.lit(i + 1)}], 0)`);
  const unknown = sql`(${piece}.b - ${piece}.a) - (${sql.join(days, sql` + `)})`;
  return sql`
    LEFT JOIN (SELECT shop_key, min(date) AS lo, max(date) AS hi FROM agg_weather_band_days GROUP BY shop_key) band_span
      ON band_span.shop_key = ${piece}.shop_key
    LEFT JOIN agg_weather_band_days band_to
      ON band_to.shop_key = ${piece}.shop_key AND band_to.date = least(greatest(${piece}.b - 1, band_span.lo), band_span.hi)
    LEFT JOIN agg_weather_band_days band_from
      ON band_from.shop_key = ${piece}.shop_key AND band_from.date = least(greatest(${piece}.a - 1, band_span.lo), band_span.hi)
    CROSS JOIN LATERAL (
      SELECT u.temp_band, u.days
      FROM unnest(ARRAY[${sql.join([...bandIds, UNKNOWN_BAND].map((id) => sql.lit(id)))}]::text[], ARRAY[${sql.join([...days, unknown])}]) AS u(temp_band, days)
      WHERE u.days > 0
    ) band`;
}
