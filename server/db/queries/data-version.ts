import { sql } from "kysely";
import type { Db } from "../database.js";

/**
 * A token that changes whenever the warehouse changes: the last batch loaded, the last rebuild of the
 * exposure aggregate, and the shop register (a shop renamed or moved in the app or by the CLI; a few hundred
 * rows at most, hashed whole). Results computed from the warehouse can be cached under it.
 */
export async function dataVersion(db: Db): Promise<string> {
  const r = await sql<{ b: string | null; t: Date | null; s: string | null }>`
    SELECT (SELECT max(batch_id)::text FROM etl_batch) AS b,
           (SELECT refreshed_at FROM agg_refresh WHERE name = 'exposure') AS t,
           (SELECT left(md5(string_agg(d::text, '|' ORDER BY d.shop_key)), 12) FROM dim_shop d) AS s
  `.execute(db);
  return `${r.rows[0]?.b ?? "0"}@${r.rows[0]?.t?.toISOString() ?? "never"}#${r.rows[0]?.s ?? "none"}`;
}
