import { sql, type Kysely } from "kysely";

// Temperature bands in the user's unit. The bands were °F only (<0, 0–20, 20–32, 32–45, ≥45 °F); now each unit
// has its own round edges (°C: <−20, −20–−10, −10–0, 0–5, ≥5 °C), and the exposure aggregates' temp_band holds
// a storage band instead: the finer partition cut at the edges of both sets (shared/bands.ts), so that every
// band of either unit is a sum of stored rows. Columns, grains and indexes are unchanged.
//
// The rows written under the old °F bands cannot be split into the finer ones (that needs each day's
// weather again), so the derived exposure tables are emptied and the refresh state cleared: the next refresh
// rebuilds everything. The server runs that rebuild at start-up, right after migrating and before it answers
// (rebuildExposureIfCleared, etl/derived/refresh-exposure.ts), as does `npm run db:migrate`; until then the
// rates read no exposure rather than exposure under bands the queries no longer know.
//
// Findings are kept by a key that named a temperature band by its °F id ("temp=0-20F"); a band is now named
// by its position in its set, coldest = 1 (shared/finding-key.ts), so the same finding keeps its key in
// either unit. Stored keys are rewritten to that form, their events with them (the event's reference now
// follows a key that changes).
const OLD_F_IDS = ["below-0F", "0-20F", "20-32F", "32-45F", "45F-up"];

export async function up(db: Kysely<any>): Promise<void> {
  await sql`TRUNCATE agg_exposure_machine, agg_exposure_cohort, agg_weather_band_days, agg_exposure, agg_exposure_fleet`.execute(db);
  await sql`DELETE FROM agg_refresh WHERE name = 'exposure'`.execute(db);
  await renameFindingKeys(db, OLD_F_IDS.map((id, i) => [id, String(i + 1)]));
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`TRUNCATE agg_exposure_machine, agg_exposure_cohort, agg_weather_band_days, agg_exposure, agg_exposure_fleet`.execute(db);
  await sql`DELETE FROM agg_refresh WHERE name = 'exposure'`.execute(db);
  await renameFindingKeys(db, OLD_F_IDS.map((id, i) => [String(i + 1), id]));
}

async function renameFindingKeys(db: Kysely<any>, pairs: [string, string][]): Promise<void> {
  await sql`ALTER TABLE finding_event DROP CONSTRAINT finding_event_finding_key_fkey`.execute(db);
  await sql`
    ALTER TABLE finding_event ADD CONSTRAINT finding_event_finding_key_fkey
      FOREIGN KEY (finding_key) REFERENCES finding_state (finding_key) ON DELETE CASCADE ON UPDATE CASCADE
  `.execute(db);
  for (const [from, to] of pairs) {
    // the temperature part of a key is "temp=<id>" after the start or a ";" and before a ";" or the end (ids hold no regex operator)
    const part = `(^|;)temp=${from}(;|$)`;
    await sql`UPDATE finding_state SET finding_key = regexp_replace(finding_key, ${part}, ${`\\1temp=${to}\\2`}) WHERE finding_key ~ ${part}`.execute(db);
  }
}
