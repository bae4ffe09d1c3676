import { sql, type Kysely, type RawBuilder } from "kysely";
import { hourBandSql } from "../../shared/band-sql.js";
import { hourBands } from "../../shared/bands.js";
import { HEATER_PLUG } from "../../shared/catalog.js";
import { splitByTemperatureBand } from "./weather-band-days.js";

/**
 * Each machine's exposure: machine-days and engine hours per month × heater-plug lot × daily-minimum
 * temperature band × engine-hour band, computed per reading segment rather than per day.
 *
 * The day-by-day definition: each day d0 + k (0 ≤ k < n) of a segment between two consecutive valid readings
 * (d0, h0) and (d1, h1) of v_engine_hours, n = d1 − d0, h1 ≥ h0, has the engine hours
 * h(k) = h0 + (h1 − h0) · (k / n) and uses (h1 − h0) / n of them; it is labelled with its month, the lot fitted
 * that day (the build lot until the machine's first heater-plug failure line, that line's lot from its day
 * on), the band of h(k), the home shop the machine had that day (machine_home_shop: a machine that moved is
 * counted at its old shop before the move and at the new one from the move's day) and the band of that
 * shop's daily minimum (no weather row: "unknown"), a storage band (shared/bands.ts: the partition both units'
 * bands are unions of).
 *
 * Here a segment is cut at the machine's moves of home shop (one piece per home-shop period it overlaps), each
 * piece into runs of one hour band, one lot and one month, and a run's days are split by temperature band
 * with two look-ups in agg_weather_band_days:
 * - hour bands: h(k) never decreases in k, in floating point too (each operation rounds monotonically), so
 *   the days of a band are one run that starts at the first k with h(k) ≥ the band's lower edge. That k is
 *   ⌈(edge − h0) · n / (h1 − h0)⌉ up to rounding; the candidates two either side are tested with the very
 *   expression h(k) above, so the cut falls on the same day as a day-by-day test would put it;
 * - the lot changes once, on the replacement day; months are cut at their first day;
 * - a run's engine hours are its days × (h1 − h0) / n (the day-by-day sum of the same value, up to rounding).
 * A segment costs a few rows instead of one per day (the demo's 3.7 million machine-days at scale 1 are
 * about a quarter of a million runs).
 *
 * Machines counted: those with a home shop and a build (or else delivery) month, listed with that cohort in
 * agg_exposure_cohort; their days at each home shop come from machine_home_shop. (A machine with neither
 * date used to make the whole rebuild fail; it is left out.)
 */

/**
 * Writes the cohort rows of every counted machine, or (`scoped`) of the machines exposure_scope lists for their
 * whole trail (the others keep theirs: only their weather changed). The cohort holds no shop: a machine's shop
 * is the home shop of each day, carried by its rows of agg_exposure_machine.
 */
export async function refreshCohorts(db: Kysely<any>, scoped: boolean): Promise<void> {
  const whole = sql`(SELECT machine_key FROM exposure_scope WHERE lo = '-infinity')`;
  await (scoped ? sql`DELETE FROM agg_exposure_cohort WHERE machine_key IN ${whole}` : sql`TRUNCATE agg_exposure_cohort`).execute(db);
  await sql`
    INSERT INTO agg_exposure_cohort (machine_key, engine_family, model_line, build_month)
    SELECT machine_key, engine_family, model_line, date_trunc('month', coalesce(build_date, delivery_date))::date
    FROM dim_machine
    WHERE home_shop_key IS NOT NULL AND coalesce(build_date, delivery_date) IS NOT NULL
      ${scoped ? sql`AND machine_key IN ${whole}` : sql``}
  `.execute(db);
}

/** Where a machine's hour band can change: the edges of the hour bands, lowest first. */
const hourEdges = [...new Set(hourBands.flatMap((b) => [b.lo, b.hi]).filter((e): e is number => e !== null))].sort((a, b) => a - b);

/** Engine hours on day k of segment `s` (the expression the day-by-day definition uses). */
const hoursOnDay = (k: RawBuilder<unknown>) => sql`(s.h0 + (s.h1 - s.h0) * ((${k})::double precision / s.n))`;

/** The first k in [0, n] with h(k) ≥ edge (n when no day of the segment reaches it). */
function firstDayAtOrAbove(edge: number): RawBuilder<unknown> {
  const e = sql.lit(edge);
  const estimate = sql`ceil((${e} - s.h0) * s.n / (s.h1 - s.h0))::bigint`;
  return sql`CASE WHEN s.h0 >= ${e} THEN 0 WHEN s.h1 <= s.h0 OR s.h1 + 1 < ${e} THEN s.n
    ELSE coalesce((SELECT min(k)::integer FROM generate_series(${estimate} - 2, ${estimate} + 2) AS k
                   WHERE k >= 1 AND k < s.n AND ${hoursOnDay(sql`k`)} >= ${e}), s.n) END`;
}

/**
 * A SELECT of (machine_key, month, lot, temp_band, hour_band, shop_key, machine_days, engine_hours): the exposure
 * of every counted machine, or (`scoped`) of the machines in the temp table exposure_scope (machine_key, lo, hi),
 * each only for its days in [lo, hi) (month starts, or ±infinity); shop_key is the machine's home shop on those days.
 */
export function machineExposureSql(scoped: boolean): RawBuilder<unknown> {
  const inScope = sql`ANY(ARRAY(SELECT machine_key FROM exposure_scope))`;
  const runEnds = [sql`0`, ...hourEdges.map(firstDayAtOrAbove), sql`s.n`];
  return sql`
    WITH reading AS (
      SELECT machine_key, reading_date AS d0, engine_hours AS h0,
             lead(reading_date) OVER w AS d1, lead(engine_hours) OVER w AS h1
      FROM v_engine_hours ${scoped ? sql`WHERE machine_key = ${inScope}` : sql``}
      WINDOW w AS (PARTITION BY machine_key ORDER BY reading_date)
    ), replacement AS (
      SELECT DISTINCT ON (f.machine_key) f.machine_key, f.opened_date AS day, coalesce(nullif(f.supplier_lot, ''), 'replacement') AS lot
      FROM fact_repair_line f JOIN dim_component c USING (component_key)
      WHERE c.component_code = ${HEATER_PLUG} AND f.line_type = 'failure' ${scoped ? sql`AND f.machine_key = ${inScope}` : sql``}
      ORDER BY f.machine_key, f.opened_date, f.repair_line_key
    ), segment AS (
      -- a segment once per home-shop period it overlaps, its days [a0, b0) cut to the period (and to the scope);
      -- d0, n, h0 and h1 stay the segment's, so each day keeps the engine hours the whole segment gives it
      SELECT r.machine_key, hs.shop_key, r.d0, r.d1 - r.d0 AS n, r.h0, r.h1,
             greatest(r.d0, hs.valid_from${scoped ? sql`, sc.lo` : sql``}) AS a0,
             least(r.d1, coalesce(hs.valid_to, 'infinity')${scoped ? sql`, sc.hi` : sql``}) AS b0,
             coalesce(nullif(m.heater_plug_lot, ''), 'none') AS build_lot, coalesce(p.day, 'infinity') AS replaced, p.lot AS replacement_lot
      FROM reading r
      JOIN agg_exposure_cohort k USING (machine_key)
      JOIN dim_machine m USING (machine_key)
      LEFT JOIN replacement p USING (machine_key)
      ${scoped ? sql`JOIN exposure_scope sc USING (machine_key)` : sql``}
      JOIN machine_home_shop hs ON hs.machine_key = r.machine_key AND hs.valid_from < r.d1 AND (hs.valid_to IS NULL OR hs.valid_to > r.d0)
      WHERE r.d1 IS NOT NULL AND r.h1 >= r.h0 ${scoped ? sql`AND r.d1 > sc.lo AND r.d0 < sc.hi` : sql``}
    ), cut AS MATERIALIZED (
      -- days run_end[i] .. run_end[i + 1] − 1 of a segment are in one hour band (run_end ascends, as h(k) does)
      SELECT s.*, ARRAY[${sql.join(runEnds)}] AS run_end FROM segment s
    ), piece AS (
      SELECT s.machine_key, s.shop_key, mo.m::date AS month, lr.lot, hb.band AS hour_band,
             greatest(x.x0, mo.m::date) AS a, least(x.x1, (mo.m + interval '1 month')::date) AS b,
             (s.h1 - s.h0) / s.n AS h_day
      FROM cut s
      CROSS JOIN LATERAL (
        SELECT s.run_end[i] AS k0, s.run_end[i + 1] AS k1, ${hourBandSql(hoursOnDay(sql`s.run_end[i]`))} AS band
        FROM generate_series(1, ${sql.lit(runEnds.length - 1)}) AS i WHERE s.run_end[i] < s.run_end[i + 1]
      ) hb
      CROSS JOIN LATERAL (VALUES (s.a0, least(greatest(s.replaced, s.a0), s.b0), s.build_lot),
                                 (greatest(least(s.replaced, s.b0), s.a0), s.b0, s.replacement_lot)) AS lr(d_from, d_to, lot)
      CROSS JOIN LATERAL (SELECT greatest(s.d0 + hb.k0, lr.d_from) AS x0, least(s.d0 + hb.k1, lr.d_to) AS x1) x
      CROSS JOIN LATERAL generate_series(date_trunc('month', x.x0::timestamp), (x.x1 - 1)::timestamp, interval '1 month') AS mo(m)
      WHERE x.x0 < x.x1
    )
    SELECT p.machine_key, p.month, p.lot, band.temp_band, p.hour_band, p.shop_key,
           sum(band.days)::integer AS machine_days, sum(band.days * p.h_day) AS engine_hours
    FROM piece p ${splitByTemperatureBand(sql`p`)}
    GROUP BY p.machine_key, p.month, p.lot, band.temp_band, p.hour_band, p.shop_key`;
}
