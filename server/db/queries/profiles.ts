import { sql } from "kysely";
import type { Db } from "../database.js";
import { listProfiles } from "../../../etl/index.js";
import { profileSchema, type Profile } from "../../../shared/schemas/profiles.js";

/**
 * Reads of the stored mapping profiles (etl_profile_version) for the admin's pages and the batch pages.
 * Writes and the seeding of the defaults go through the ETL's profile store (etl/profiles/profile-store.ts).
 */

export interface ProfileVersionRow {
  profile_id: string;
  version: number;
  kind: string;
  body: unknown;
  saved_by: string;
  saved_at: Date;
  note: string | null;
}

/** Every profile's latest version with how many versions it has and how many batches read with it. */
export async function listStoredProfiles(db: Db): Promise<(ProfileVersionRow & { versions: number; batches: number })[]> {
  const r = await sql<ProfileVersionRow & { versions: number; batches: number }>`
    SELECT DISTINCT ON (v.profile_id) v.*,
      (SELECT count(*)::int FROM etl_profile_version w WHERE w.profile_id = v.profile_id) AS versions,
      (SELECT count(*)::int FROM etl_batch b WHERE b.profile = v.profile_id) AS batches
    FROM etl_profile_version v ORDER BY v.profile_id, v.version DESC`.execute(db);
  return r.rows;
}

/** Every version of one profile, newest first, with the batches each read. */
export async function profileHistory(db: Db, id: string): Promise<(ProfileVersionRow & { batches: number })[]> {
  const r = await sql<ProfileVersionRow & { batches: number }>`
    SELECT v.*, (SELECT count(*)::int FROM etl_batch b WHERE b.profile = v.profile_id AND b.profile_version = v.version) AS batches
    FROM etl_profile_version v WHERE v.profile_id = ${id} ORDER BY v.version DESC`.execute(db);
  return r.rows;
}

/**
 * The profile a batch was read with: its recorded version, else (a batch from before versions were kept)
 * the oldest stored version, else the file default; null when none is known or it no longer parses.
 */
export async function profileOfBatch(db: Db, id: string, version: number | null): Promise<Profile | null> {
  const r = await sql<{ body: unknown }>`
    SELECT body FROM etl_profile_version WHERE profile_id = ${id}
    ORDER BY ${version === null ? sql`version` : sql`(version = ${version}) DESC, version`} LIMIT 1`.execute(db);
  const body = r.rows[0]?.body ?? listProfiles().find((p) => p.id === id) ?? null;
  const parsed = profileSchema.safeParse(body);
  return parsed.success ? parsed.data : null;
}
