import { sql, type Kysely } from "kysely";
import { hourBandSql, temperatureBandSql, UNKNOWN_BAND } from "../../shared/band-sql.js";
import { HEATER_PLUG } from "../../shared/catalog.js";

/**
 * Rebuilds agg_exposure from the hour-meter trail, the fleet and the daily weather.
 *
 * Each machine's day between two consecutive valid readings gets the linearly interpolated engine hours
 * (continuous across meter generations, v_engine_hours) and the hours used that day; days after the last
 * reading are not counted (no extrapolation). The day is labelled with its home shop's daily minimum
 * temperature band and its engine-hour band, and with the heater-plug lot fitted that day (the build lot
 * until the first heater-plug replacement, then the replacement's lot). Runs inside one transaction.
 */
// Kysely<any>: the ETL writes raw SQL and does not import the server's schema types.
export async function refreshExposure(db: Kysely<any>): Promise<{ rows: number; seconds: number }> {
  const started = performance.now();
  const hAt = sql`d.h_at`;
  const tmin = sql`w.tmin_c`;
  const rows = await db.transaction().execute(async (trx) => {
    // The final GROUP BY sorts every machine-day (3.7 million at the demo's scale 1, about 330 MB): with room
    // for it in memory the rebuild takes about 17 s on the development machine, spilled to disk about 35 s.
    // Transaction-local; a larger warehouse spills the rest as before.
    await sql`SET LOCAL work_mem = '1GB'`.execute(trx);
    await sql`SET LOCAL jit = off`.execute(trx);
    await sql`TRUNCATE agg_exposure`.execute(trx);
    const res = await sql`
      INSERT INTO agg_exposure (engine_family, model_line, build_month, lot, shop_key, month, temp_band, hour_band,
                                machines, machine_days, engine_hours)
      WITH seg AS (
        SELECT machine_key, reading_date AS d0, engine_hours AS h0,
               lead(reading_date) OVER w AS d1, lead(engine_hours) OVER w AS h1
        FROM v_engine_hours
        WINDOW w AS (PARTITION BY machine_key ORDER BY reading_date)
      ), days AS (
        SELECT s.machine_key, (s.d0 + k) AS day,
               s.h0 + (s.h1 - s.h0) * (k::double precision / (s.d1 - s.d0)) AS h_at,
               (s.h1 - s.h0) / (s.d1 - s.d0) AS h_day
        FROM seg s CROSS JOIN LATERAL generate_series(0, s.d1 - s.d0 - 1) AS k
        WHERE s.d1 IS NOT NULL AND s.h1 >= s.h0
      ), repl AS (
        SELECT DISTINCT ON (f.machine_key) f.machine_key, f.opened_date AS repl_date,
               coalesce(nullif(f.supplier_lot, ''), 'replacement') AS repl_lot
        FROM fact_repair_line f JOIN dim_component c USING (component_key)
        WHERE c.component_code = ${HEATER_PLUG} AND f.line_type = 'failure'
        ORDER BY f.machine_key, f.opened_date
      ), mach AS (
        SELECT m.machine_key, m.engine_family, m.model_line, m.home_shop_key,
               date_trunc('month', coalesce(m.build_date, m.delivery_date))::date AS build_month,
               coalesce(nullif(m.heater_plug_lot, ''), 'none') AS build_lot, r.repl_date, r.repl_lot
        FROM dim_machine m LEFT JOIN repl r USING (machine_key)
        WHERE m.home_shop_key IS NOT NULL
      ), wd AS (
        SELECT w.shop_key, w.date, date_trunc('month', w.date)::date AS month, ${temperatureBandSql(tmin)} AS temp_band
        FROM fact_weather_day w
      )
      SELECT m.engine_family, m.model_line, m.build_month,
             CASE WHEN d.day >= m.repl_date THEN m.repl_lot ELSE m.build_lot END AS lot,
             m.home_shop_key, coalesce(wd.month, date_trunc('month', d.day)::date),
             coalesce(wd.temp_band, ${UNKNOWN_BAND}), ${hourBandSql(hAt)},
             0, count(*), sum(d.h_day)
      FROM days d
      JOIN mach m ON m.machine_key = d.machine_key
      LEFT JOIN wd ON wd.shop_key = m.home_shop_key AND wd.date = d.day
      GROUP BY 1, 2, 3, 4, 5, 6, 7, 8
    `.execute(trx);
    const n = Number(res.numAffectedRows ?? 0);
    await sql`TRUNCATE agg_exposure_fleet`.execute(trx);
    await sql`
      INSERT INTO agg_exposure_fleet (engine_family, model_line, shop_key, month, temp_band, hour_band, machine_days, engine_hours)
      SELECT engine_family, model_line, shop_key, month, temp_band, hour_band, sum(machine_days), sum(engine_hours)
      FROM agg_exposure GROUP BY 1, 2, 3, 4, 5, 6
    `.execute(trx);
    const batch = await sql<{ b: number | null }>`SELECT max(batch_id)::bigint AS b FROM etl_batch`.execute(trx);
    await sql`
      INSERT INTO agg_refresh (name, refreshed_at, last_batch, rows, seconds)
      VALUES ('exposure', now(), ${batch.rows[0]?.b ?? null}, ${n}, ${(performance.now() - started) / 1000})
      ON CONFLICT (name) DO UPDATE SET refreshed_at = excluded.refreshed_at, last_batch = excluded.last_batch,
        rows = excluded.rows, seconds = excluded.seconds
    `.execute(trx);
    return n;
  });
  return { rows, seconds: (performance.now() - started) / 1000 };
}
