import { sql, type RawBuilder } from "kysely";
import { hourBands, temperatureBands, type Band } from "./bands.js";

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
export const temperatureBandSql = (celsius: RawBuilder<unknown>) => bandCase(celsius, temperatureBands, UNKNOWN_BAND);
export const hourBandSql = (hours: RawBuilder<unknown>) => bandCase(hours, hourBands, UNKNOWN_BAND);
