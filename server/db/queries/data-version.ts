import { sql } from "kysely";
import type { Db } from "../database.js";

/**
 * What the warehouse holds, read in one query: the data version (below) and the two batch marks behind it.
 * - `batch`: the last batch committed (any status);
 * - `exposureBatch`: the last batch the exposure refresh had seen when it last ran (agg_refresh.last_batch);
 * - `refreshPending`: a loaded batch changed rows after that mark within the last {@link REFRESH_GRACE_MINUTES}
 *   minutes, so a refresh is on its way (an upload's load and the CLI refresh after every load that changed
 *   rows): answers computed now would have the new lines against the old engine hours and be thrown away
 *   when the refresh commits.
 */
export interface DataState {
  version: string;
  batch: string | null;
  exposureBatch: string | null;
  refreshPending: boolean;
}

/** How long after a load that changed rows a refresh is waited for before answers are computed anyway. */
export const REFRESH_GRACE_MINUTES = 5;

export async function dataState(db: Db): Promise<DataState> {
  const r = await sql<{ b: string | null; t: Date | null; e: string | null; s: string | null; p: boolean }>`
    WITH x AS (SELECT refreshed_at, last_batch FROM agg_refresh WHERE name = 'exposure')
    SELECT (SELECT max(batch_id)::text FROM etl_batch) AS b,
           (SELECT refreshed_at FROM x) AS t,
           (SELECT last_batch::text FROM x) AS e,
           (SELECT left(md5(string_agg(d::text, '|' ORDER BY d.shop_key)), 12) FROM dim_shop d) AS s,
           EXISTS (
             SELECT 1 FROM etl_batch b
             WHERE b.batch_id > coalesce((SELECT last_batch FROM x), 0) AND b.status = 'loaded'
               AND b.rows_inserted + b.rows_updated > 0
               AND b.finished_at > now() - make_interval(mins => ${REFRESH_GRACE_MINUTES})
           ) AS p
  `.execute(db);
  const row = r.rows[0];
  return {
    version: `${row?.b ?? "0"}@${row?.t?.toISOString() ?? "never"}#${row?.s ?? "none"}`,
    batch: row?.b ?? null,
    exposureBatch: row?.e ?? null,
    refreshPending: row?.p ?? false,
  };
}

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

/** The last batch a data version covers (its part before '@'), as a number; 0 for none. */
export const versionBatch = (version: string): bigint => {
  const b = version.slice(0, version.indexOf("@"));
  return /^\d+$/.test(b) ? BigInt(b) : 0n;
};
