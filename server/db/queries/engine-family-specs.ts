import { sql, type Selectable } from "kysely";
import type { Db } from "../database.js";
import type { EngineSpecVersionTable } from "../schema.js";
import { engineFamilies } from "../../../shared/catalog.js";
import { specPsi, type EngineSpec, type EngineSpecInput } from "../../../shared/schemas/engine-specs.js";

/**
 * An engine family's own figures (engine_spec_version, migration 0069): one row per saved version, never
 * updated; the family's current figures are its highest version. A save names the version it started from, so
 * two admins editing at once cannot overwrite each other: the second is told to reopen the family.
 */

type Row = Selectable<EngineSpecVersionTable>;

export const specOfRow = (r: Row): EngineSpec => ({
  engineFamily: r.engine_family,
  version: r.version,
  enteredUnit: r.entered_unit,
  targetMinPsi: Number(r.target_min_psi),
  targetMaxPsi: Number(r.target_max_psi),
  allowableMinPsi: Number(r.allowable_min_psi),
  plugHealthyMaxOhms: r.plug_healthy_max_ohm === null ? null : Number(r.plug_healthy_max_ohm),
  source: r.source,
  savedBy: r.saved_by,
  savedAt: r.saved_at.toISOString(),
  note: r.note,
});

/** The engine families Ironledger knows: the catalog's and any the machines carry, with the catalog's description. */
export async function knownFamilies(db: Db): Promise<{ code: string; description: string | null }[]> {
  const r = await sql<{ engine_family: string }>`SELECT DISTINCT engine_family FROM dim_machine WHERE engine_family IS NOT NULL`.execute(db);
  const codes = new Set<string>([...engineFamilies.map((f) => f.code), ...r.rows.map((x) => x.engine_family)]);
  return [...codes].sort().map((code) => ({ code, description: engineFamilies.find((f) => f.code === code)?.description ?? null }));
}

/** Every version of one family's figures, newest first (empty when the family has none). */
export async function specHistory(db: Db, family: string): Promise<EngineSpec[]> {
  const rows = await db.selectFrom("engine_spec_version").selectAll().where("engine_family", "=", family).orderBy("version", "desc").execute();
  return rows.map(specOfRow);
}

/** The current figures of one family, or null when it has none. */
export async function currentSpec(db: Db, family: string | null): Promise<EngineSpec | null> {
  if (!family) return null;
  const row = await db.selectFrom("engine_spec_version").selectAll().where("engine_family", "=", family).orderBy("version", "desc").limit(1).executeTakeFirst();
  return row ? specOfRow(row) : null;
}

/** Every family's current figures with how many versions it has. */
export async function currentSpecs(db: Db): Promise<Map<string, { spec: EngineSpec; versions: number }>> {
  const r = await sql<Row & { versions: number }>`
    SELECT DISTINCT ON (v.engine_family) v.*, v.spec_version_id::text AS spec_version_id,
      (SELECT count(*)::int FROM engine_spec_version w WHERE w.engine_family = v.engine_family) AS versions
    FROM engine_spec_version v
    ORDER BY v.engine_family, v.version DESC`.execute(db);
  return new Map(r.rows.map((x) => [x.engine_family, { spec: specOfRow(x), versions: x.versions }]));
}

export type SpecSaveOutcome = { saved: true; version: number } | { saved: false; latest: number | null };

/**
 * Saves the figures (converted to psi) as the family's next version when `basedOn` is still its latest (null: a
 * family with no figures yet, which starts at version 1); otherwise saves nothing and returns the latest version.
 */
export async function saveSpecVersion(db: Db, family: string, spec: EngineSpecInput, basedOn: number | null, savedBy: string, note: string): Promise<SpecSaveOutcome> {
  return await db.transaction().execute(async (trx) => {
    // one save at a time per family: the advisory lock is released with the transaction
    await sql`SELECT pg_advisory_xact_lock(hashtext('engine_spec_version'), hashtext(${family}))`.execute(trx);
    const top = await trx.selectFrom("engine_spec_version").select((eb) => eb.fn.max("version").as("latest")).where("engine_family", "=", family).executeTakeFirst();
    const latest = top?.latest ?? null;
    if (latest !== basedOn) return { saved: false, latest };
    const version = (latest ?? 0) + 1;
    await trx
      .insertInto("engine_spec_version")
      .values({
        engine_family: family,
        version,
        entered_unit: spec.unit,
        target_min_psi: specPsi(spec.targetMin, spec.unit),
        target_max_psi: specPsi(spec.targetMax, spec.unit),
        allowable_min_psi: specPsi(spec.allowableMin, spec.unit),
        plug_healthy_max_ohm: spec.plugHealthyMaxOhms,
        source: spec.source,
        saved_by: savedBy,
        note,
      })
      .execute();
    return { saved: true, version };
  });
}
