import { sql, type Kysely } from "kysely";
import { scopeChanges, type ChangeScope } from "./exposure-changes.js";
import { applyDelta } from "./exposure-rollup.js";
import { machineExposureSql, refreshCohorts } from "./machine-exposure.js";
import { rebuildBandDays } from "./weather-band-days.js";
import { refreshMachineTrail } from "./machine-trail.js";

/**
 * The incremental refresh: the machines the batches after `since` touched are computed again (for the days
 * in exposure_scope), their new shares are compared with the stored ones row by row, and only the rows that
 * differ change agg_exposure_machine and, summed to the aggregate's grain, agg_exposure: a changed row is
 * taken out under the cohort it was counted under and put back under the cohort it has now (the same one,
 * unless the machine's master row changed). A row's shop is part of its grain (the machine's home shop on its
 * days): days a move hands to another shop leave the old shop's rows and arrive in the new shop's. Returns
 * what was in scope and the change in agg_exposure's row count.
 */
export async function foldInChanges(db: Kysely<any>, since: number): Promise<ChangeScope & { rowChange: number }> {
  const scope = await scopeChanges(db, since);
  if (scope.weatherShops.length > 0) await rebuildBandDays(db, scope.weatherShops);
  await sql`
    CREATE TEMP TABLE exposure_old ON COMMIT DROP AS
    SELECT k.engine_family, k.model_line, k.build_month, c.*
    FROM agg_exposure_machine c
    JOIN exposure_scope s ON s.machine_key = c.machine_key AND c.month >= s.lo AND c.month < s.hi
    JOIN agg_exposure_cohort k ON k.machine_key = c.machine_key
  `.execute(db);
  await refreshCohorts(db, true);
  await refreshMachineTrail(db, "scoped");
  await sql`
    CREATE TEMP TABLE exposure_new ON COMMIT DROP AS
    SELECT k.engine_family, k.model_line, k.build_month, x.*
    FROM (${machineExposureSql(true)}) x JOIN agg_exposure_cohort k USING (machine_key)
  `.execute(db);
  // hashed: sorting both sides on their text columns costs about twice as much
  await sql`SET LOCAL enable_mergejoin = off`.execute(db);
  await sql`
    CREATE TEMP TABLE exposure_diff ON COMMIT DROP AS
    SELECT machine_key, month, lot, temp_band, hour_band, shop_key,
           o.engine_family AS o_family, o.model_line AS o_line, o.build_month AS o_build,
           o.machine_days AS o_days, o.engine_hours AS o_hours,
           n.engine_family AS n_family, n.model_line AS n_line, n.build_month AS n_build,
           n.machine_days AS n_days, n.engine_hours AS n_hours
    FROM exposure_new n FULL JOIN exposure_old o USING (machine_key, month, lot, temp_band, hour_band, shop_key)
    WHERE (n.machine_days, n.engine_hours, n.engine_family, n.model_line, n.build_month)
      IS DISTINCT FROM (o.machine_days, o.engine_hours, o.engine_family, o.model_line, o.build_month)
  `.execute(db);
  await sql`SET LOCAL enable_mergejoin TO DEFAULT`.execute(db);
  // joined to agg_exposure_machine next: by index, given its row count
  await sql`ANALYZE exposure_diff`.execute(db);
  await sql`
    DELETE FROM agg_exposure_machine c USING exposure_diff d
    WHERE c.machine_key = d.machine_key
      AND (c.month, c.lot, c.temp_band, c.hour_band, c.shop_key) = (d.month, d.lot, d.temp_band, d.hour_band, d.shop_key)
  `.execute(db);
  await sql`
    INSERT INTO agg_exposure_machine (machine_key, month, lot, temp_band, hour_band, shop_key, machine_days, engine_hours)
    SELECT machine_key, month, lot, temp_band, hour_band, shop_key, n_days, n_hours FROM exposure_diff WHERE n_days IS NOT NULL
  `.execute(db);
  await sql`
    CREATE TEMP TABLE exposure_delta ON COMMIT DROP AS
    SELECT v.engine_family, v.model_line, v.build_month, d.lot, d.shop_key, d.month, d.temp_band, d.hour_band,
           sum(v.days)::integer AS days, sum(v.hours) AS hours
    FROM exposure_diff d
    CROSS JOIN LATERAL (VALUES (d.o_family, d.o_line, d.o_build, -d.o_days, -d.o_hours),
                               (d.n_family, d.n_line, d.n_build, d.n_days, d.n_hours))
      AS v(engine_family, model_line, build_month, days, hours)
    WHERE v.days IS NOT NULL
    GROUP BY v.engine_family, v.model_line, v.build_month, d.lot, d.shop_key, d.month, d.temp_band, d.hour_band
  `.execute(db);
  return { ...scope, rowChange: await applyDelta(db) };
}
