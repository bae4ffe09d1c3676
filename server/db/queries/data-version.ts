import { sql } from "kysely";
import type { Db } from "../database.js";

/**
 * A token that changes whenever the warehouse changes: the last batch loaded and the last rebuild of the
 * exposure aggregate. Results computed from the warehouse can be cached under it.
 */
export async function dataVersion(db: Db): Promise<string> {
  const r = await sql<{ b: string | null; t: Date | null }>`
    SELECT (SELECT max(batch_id)::text FROM etl_batch) AS b,
           (SELECT refreshed_at FROM agg_refresh WHERE name = 'exposure') AS t
  `.execute(db);
  return `${r.rows[0]?.b ?? "0"}@${r.rows[0]?.t?.toISOString() ?? "never"}`;
}
