import { sql, type Kysely } from "kysely";
import { recordNotableReadings } from "./exposure-changes.js";
import { rollUpAll } from "./exposure-rollup.js";
import { foldInChanges } from "./fold-in-changes.js";
import { machineExposureSql, refreshCohorts } from "./machine-exposure.js";
import { reloadTable } from "./reload-table.js";
import { rebuildBandDays } from "./weather-band-days.js";
import { refreshMachineTrail } from "./machine-trail.js";

/**
 * Keeps agg_exposure and agg_exposure_fleet current after loads: machine-days and engine hours per cohort ×
 * home shop × month × daily-minimum temperature band × engine-hour band × heater-plug lot. The home shop is the
 * one the machine had on each day (machine_home_shop), so a machine that moved counts at both shops.
 *
 *   refreshExposure(db)                 fold in what the batches since the last refresh changed (after a load)
 *   refreshExposure(db, { full: true }) rebuild everything (scripts/refresh-derived.ts)
 *   rebuildExposureIfCleared(db)        rebuild everything when a migration emptied the tables (server start-up)
 *
 * Why incremental. Rebuilding means going over every machine's whole hour trail; its cost grows with the
 * warehouse while a monthly export touches a few thousand machines. So each machine's share of the aggregate
 * is kept (agg_exposure_machine, by day's home shop, with the cohort it was counted under in agg_exposure_cohort), and a
 * refresh (fold-in-changes.ts):
 * 1. finds what the batches since agg_refresh.last_batch touched (exposure-changes.ts): machines whose master
 *    row, home shops, readings, meter verdicts or heater-plug lines changed, computed again whole; shops whose
 *    weather changed, whose machines (those homed there in the months concerned) are computed again for those months;
 * 2. computes those machines' shares (machine-exposure.ts) and keeps the rows that differ from the stored ones
 *    (a new reading at the end of a trail changes a month or two of it; the rest is neither written nor
 *    added up again, so groups nothing touched keep their exact figures);
 * 3. adds the difference to agg_exposure and agg_exposure_fleet through their unique grain indexes (groups
 *    reaching zero days are dropped; exposure-rollup.ts).
 * Its cost follows the machines touched, not the warehouse: at the demo's scale 5 a 5,000-line export
 * touches a quarter of the fleet and is folded in in about a quarter of the time of a rebuild; at 10 million
 * lines the same export touches well under 1 %. (At scale 1 it touches 83 %, and folding in costs about as
 * much as rebuilding.) A full rebuild computes every share and sums them, building the tables' indexes after
 * the rows (reload-table.ts): the two agree row for row (machine-days exactly, engine hours up to
 * floating-point rounding, which additions and subtractions accumulate until the next full rebuild;
 * tests/etl/exposure-incremental.test.ts).
 *
 * Why per segment. The shares are computed per reading segment cut into runs of one month, lot and hour band,
 * whose days fall in temperature bands by running counts of the shop's weather days (weather-band-days.ts),
 * instead of one row per machine-day: rows grow with readings and months rather than with days.
 *
 * Temperature bands. temp_band holds a storage band (shared/bands.ts): the partition cut at the edges of both
 * the °C and the °F bands, so each unit's band is a sum of stored rows and one aggregate answers in both.
 *
 * Batches. A load writes its batch row and its facts in one transaction, and batch ids are handed out when a
 * load starts, not when it commits: a refresh that ran beside a load could record a later batch as its high
 * mark and never see the earlier one. The refresh therefore locks etl_batch against writes (SHARE ROW
 * EXCLUSIVE: it waits for running loads to commit, holds new ones at their first write, and excludes another
 * refresh); every batch up to the mark it records is then complete. Runs in one transaction.
 */

export interface ExposureRefresh {
  mode: "full" | "incremental";
  /** agg_exposure's rows afterwards */
  rows: number;
  /** machines computed again (all counted machines in a full rebuild) */
  machines: number;
  seconds: number;
}

// Kysely<any>: the ETL writes raw SQL and does not import the server's schema types.
export async function refreshExposure(db: Kysely<any>, options: { full?: boolean } = {}): Promise<ExposureRefresh> {
  const started = performance.now();
  return db.transaction().execute(async (trx) => {
    await sql`SET LOCAL work_mem = '256MB'`.execute(trx);
    await sql`SET LOCAL jit = off`.execute(trx);
    await sql`LOCK TABLE etl_batch IN SHARE ROW EXCLUSIVE MODE`.execute(trx);
    const state = (
      await sql<{ last_batch: string | null; rows: number }>`SELECT last_batch, rows FROM agg_refresh WHERE name = 'exposure'`.execute(trx)
    ).rows[0];
    const latest = (await sql<{ b: string | null }>`SELECT max(batch_id)::text AS b FROM etl_batch`.execute(trx)).rows[0].b;
    let done: Omit<ExposureRefresh, "seconds">;
    if (options.full || !state) {
      done = { mode: "full", ...(await rebuildAll(trx)) };
    } else if (latest === state.last_batch) {
      return { mode: "incremental", rows: state.rows, machines: 0, seconds: (performance.now() - started) / 1000 };
    } else {
      const folded = await foldInChanges(trx, Number(state.last_batch ?? 0));
      done = { mode: "incremental", rows: state.rows + folded.rowChange, machines: folded.machines + folded.weatherMachines };
    }
    const seconds = (performance.now() - started) / 1000;
    await sql`
      INSERT INTO agg_refresh (name, refreshed_at, last_batch, rows, seconds)
      VALUES ('exposure', now(), ${latest}, ${done.rows}, ${seconds})
      ON CONFLICT (name) DO UPDATE SET refreshed_at = excluded.refreshed_at, last_batch = excluded.last_batch,
        rows = excluded.rows, seconds = excluded.seconds
    `.execute(trx);
    return { ...done, seconds };
  });
}

/**
 * Rebuilds the exposure when a migration emptied it and cleared its refresh state (a change of bands or of
 * the shares' grain: migrations 0043, 0054, 0057) while the warehouse holds loaded batches; otherwise does
 * nothing. Run after migrating, before anything reads the aggregates. Returns the rebuild, or null.
 */
export async function rebuildExposureIfCleared(db: Kysely<any>): Promise<ExposureRefresh | null> {
  const r = await sql<{ cleared: boolean }>`
    SELECT NOT EXISTS (SELECT 1 FROM agg_refresh WHERE name = 'exposure') AND EXISTS (SELECT 1 FROM etl_batch) AS cleared
  `.execute(db);
  return r.rows[0]?.cleared ? refreshExposure(db, { full: true }) : null;
}

/** Every share computed and summed; the weather counts and the verdict snapshot rebuilt with them. */
async function rebuildAll(db: Kysely<any>): Promise<{ rows: number; machines: number }> {
  await refreshCohorts(db, false);
  await refreshMachineTrail(db, "all");
  await rebuildBandDays(db, "all");
  await reloadTable(db, "agg_exposure_machine", () =>
    sql`
      INSERT INTO agg_exposure_machine (machine_key, month, lot, temp_band, hour_band, shop_key, machine_days, engine_hours)
      ${machineExposureSql(false)}
    `.execute(db),
  );
  await recordNotableReadings(db);
  const machines = await sql<{ n: number }>`SELECT count(*)::integer AS n FROM agg_exposure_cohort`.execute(db);
  return { rows: await rollUpAll(db), machines: machines.rows[0].n };
}
