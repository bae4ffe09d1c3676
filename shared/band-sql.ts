import { sql, type RawBuilder } from "kysely";
import { hourBands, storageBands, storageBandsOfAll, temperatureBandsIn, unitBandOfStorage, type Band, type TemperatureUnit } from "./bands.js";

/** The temperature and hour bands of shared/bands.ts as SQL, for the warehouse's queries and its derived tables. */

/** CASE expression placing a numeric expression in one of the bands (lo inclusive, hi exclusive). */
function bandCase(expr: RawBuilder<unknown>, bands: readonly Band[], unknown: string): RawBuilder<string> {
  const whens = bands.map((b) => {
    const conds: RawBuilder<unknown>[] = [];
    if (b.lo !== null) conds.push(sql`${expr} >= ${sql.lit(b.lo)}`);
    if (b.hi !== null) conds.push(sql`${expr} < ${sql.lit(b.hi)}`);
    return sql`WHEN ${sql.join(conds, sql` AND `)} THEN ${sql.lit(b.id)}`;
  });
  return sql<string>`CASE ${sql.join(whens, sql` `)} ELSE ${sql.lit(unknown)} END`;
}

export const UNKNOWN_BAND = "unknown";

/** The storage band of a daily minimum in °C (null: "unknown"): what agg_exposure*.temp_band hold. */
export const storageBandSql = (celsius: RawBuilder<unknown>) => bandCase(celsius, storageBands, UNKNOWN_BAND);

/** The band of `unit`'s set of a daily minimum in °C (null: "unknown"). */
export const temperatureBandSql = (unit: TemperatureUnit, celsius: RawBuilder<unknown>) => bandCase(celsius, temperatureBandsIn(unit), UNKNOWN_BAND);

/** The band of `unit`'s set of a stored storage-band column ("unknown" stays "unknown"). */
export function unitBandOfStorageSql(unit: TemperatureUnit, column: RawBuilder<unknown>): RawBuilder<string> {
  const whens = storageBands.map((s) => sql`WHEN ${sql.lit(s.id)} THEN ${sql.lit(unitBandOfStorage(s.id, unit)!)}`);
  return sql<string>`CASE ${column} ${sql.join(whens, sql` `)} ELSE ${column} END`;
}

/** `column IN (…)`: a storage-band column against the storage bands of a list of band ids of either set. */
export function inTemperatureBandsSql(storageColumn: RawBuilder<unknown>, ids: readonly string[]): RawBuilder<unknown> {
  const storage = storageBandsOfAll(ids);
  return storage.length ? sql`${storageColumn} IN (${sql.join(storage.map((id) => sql.lit(id)))})` : sql`FALSE`;
}

export const hourBandSql = (hours: RawBuilder<unknown>) => bandCase(hours, hourBands, UNKNOWN_BAND);
