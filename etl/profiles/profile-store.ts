import pg from "pg";
import { EtlFatalError } from "../errors.js";
import { profileSchema, type Profile } from "./profile-schema.js";
import { listProfiles } from "./registry.js";

/**
 * Mapping profiles as the warehouse keeps them: versioned rows of etl_profile_version (migration 0053), seeded
 * from the files in etl/profiles/, which stay the defaults. A load reads the latest version of every profile
 * and records the version it used on its batch; saving an edit adds a version and never changes an old one.
 *
 * Seeding rule: a file profile with no stored version is stored as version 1, saved by "defaults". When a
 * file changes later (a new release of Ironledger), its new content becomes the next version only while the
 * latest stored version is still the defaults': an edit an admin saved is never overwritten by a file.
 */
export interface VersionedProfile {
  profile: Profile;
  /** null for an unsaved draft being tried against a sample */
  version: number | null;
}

export const DEFAULTS_AUTHOR = "defaults";

type Queryable = pg.Pool | pg.PoolClient | pg.Client;

/** Stores the file profiles the table lacks, or whose file changed while no person has edited them. */
export async function seedDefaultProfiles(q: Queryable): Promise<number> {
  const files = listProfiles();
  const r = await q.query(
    `WITH f AS (SELECT x->>'id' AS id, x->>'kind' AS kind, x AS body FROM jsonb_array_elements($1::jsonb) AS x),
          latest AS (SELECT DISTINCT ON (profile_id) profile_id, version, body, saved_by
                     FROM etl_profile_version ORDER BY profile_id, version DESC)
     INSERT INTO etl_profile_version (profile_id, version, kind, body, saved_by, note)
     SELECT f.id, coalesce(l.version, 0) + 1, f.kind, f.body, $2,
            CASE WHEN l.version IS NULL THEN 'from etl/profiles' ELSE 'etl/profiles changed' END
     FROM f LEFT JOIN latest l ON l.profile_id = f.id
     WHERE l.version IS NULL OR (l.saved_by = $2 AND l.body <> f.body)
     ON CONFLICT (profile_id, version) DO NOTHING`,
    [JSON.stringify(files), DEFAULTS_AUTHOR],
  );
  return r.rowCount ?? 0;
}

/** The latest version of every stored profile (seeding the defaults first), sorted by id. */
export async function currentProfiles(q: Queryable): Promise<VersionedProfile[]> {
  await seedDefaultProfiles(q);
  const r = await q.query<{ profile_id: string; version: number; body: unknown }>(
    `SELECT DISTINCT ON (profile_id) profile_id, version, body FROM etl_profile_version ORDER BY profile_id, version DESC`,
  );
  return r.rows.map((row) => ({ profile: parseStored(row.profile_id, row.version, row.body), version: row.version }));
}

/** One version of a profile (the latest without `version`), or null when there is none. */
export async function storedProfile(q: Queryable, id: string, version?: number): Promise<VersionedProfile | null> {
  await seedDefaultProfiles(q);
  const r = await q.query<{ version: number; body: unknown }>(
    version === undefined
      ? `SELECT version, body FROM etl_profile_version WHERE profile_id = $1 ORDER BY version DESC LIMIT 1`
      : `SELECT version, body FROM etl_profile_version WHERE profile_id = $1 AND version = $2`,
    version === undefined ? [id] : [id, version],
  );
  const row = r.rows[0];
  return row ? { profile: parseStored(id, row.version, row.body), version: row.version } : null;
}

/**
 * Saves `profile` as the next version of its id. `basedOn` is the version the editor started from: when
 * someone saved another version meanwhile the save is refused (PROFILE_CHANGED) rather than silently
 * replacing their edit. A new id is saved as version 1 (basedOn null). The kind of a profile never changes.
 */
export async function saveProfileVersion(
  q: Queryable,
  profile: Profile,
  basedOn: number | null,
  savedBy: string,
  note: string | null,
): Promise<number> {
  const parsed = profileSchema.parse(profile);
  const latest = await q.query<{ version: number; kind: string }>(
    `SELECT version, kind FROM etl_profile_version WHERE profile_id = $1 ORDER BY version DESC LIMIT 1`,
    [parsed.id],
  );
  const current = latest.rows[0] ?? null;
  if (current && current.kind !== parsed.kind) {
    throw new EtlFatalError("WRONG_KIND", `profile ${parsed.id} reads ${current.kind} exports; a profile's kind cannot change (save it under a new name instead)`);
  }
  if ((current?.version ?? null) !== basedOn) {
    throw new EtlFatalError(
      "PROFILE_CHANGED",
      current === null
        ? `profile ${parsed.id} does not exist any more`
        : basedOn === null
          ? `a profile named ${parsed.id} already exists; choose another name`
          : `profile ${parsed.id} was saved as version ${current.version} after you opened version ${basedOn}; open it again and redo your change`,
    );
  }
  const version = (current?.version ?? 0) + 1;
  const ins = await q.query(
    `INSERT INTO etl_profile_version (profile_id, version, kind, body, saved_by, note) VALUES ($1, $2, $3, $4, $5, $6)
     ON CONFLICT (profile_id, version) DO NOTHING`,
    [parsed.id, version, parsed.kind, JSON.stringify(parsed), savedBy, note],
  );
  if (ins.rowCount === 0) {
    throw new EtlFatalError("PROFILE_CHANGED", `profile ${parsed.id} was saved by someone else at the same moment; open it again and redo your change`);
  }
  return version;
}

/** A stored body read back through the schema (defaults filled in); a body that no longer parses is a fault, named. */
function parseStored(id: string, version: number, body: unknown): Profile {
  const p = profileSchema.safeParse(body);
  if (!p.success) throw new Error(`stored profile ${id} version ${version} is invalid: ${p.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  return p.data;
}

/** The latest profiles read through a pool or a connection string (a short connection of its own). */
export async function profilesAt(target: pg.Pool | string): Promise<VersionedProfile[]> {
  if (typeof target !== "string") return currentProfiles(target);
  const client = new pg.Client({ connectionString: target });
  await client.connect();
  try {
    return await currentProfiles(client);
  } finally {
    await client.end();
  }
}
