import { sql, type Kysely } from "kysely";

// Mapping profiles live in the database, versioned: a saved edit is a new version and never changes an old one,
// and every batch records the version it was read with, so a batch can always be explained by the exact
// profile that read it. The files in etl/profiles/ are the defaults the table is seeded from
// (etl/profiles/profile-store.ts: saved_by 'defaults').
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE etl_profile_version (
      profile_id text NOT NULL CHECK (profile_id ~ '^[a-z0-9-]+$'),
      version    integer NOT NULL CHECK (version >= 1),
      kind       text NOT NULL CHECK (kind IN ('machines','jobs','measurements','weather','hours')),
      body       jsonb NOT NULL,
      saved_by   text NOT NULL,
      saved_at   timestamptz NOT NULL DEFAULT now(),
      note       text,
      PRIMARY KEY (profile_id, version)
    )
  `.execute(db);
  await sql`ALTER TABLE etl_batch ADD COLUMN profile_version integer`.execute(db);
  // the same bytes may be loaded again once the profile that reads them has changed (a date format put right)
  await sql`DROP INDEX etl_batch_loaded_sha256_key`.execute(db);
  await sql`CREATE UNIQUE INDEX etl_batch_loaded_sha256_key ON etl_batch (sha256, profile, coalesce(profile_version, 0)) WHERE status = 'loaded'`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX etl_batch_loaded_sha256_key`.execute(db);
  await sql`CREATE UNIQUE INDEX etl_batch_loaded_sha256_key ON etl_batch (sha256) WHERE status = 'loaded'`.execute(db);
  await sql`ALTER TABLE etl_batch DROP COLUMN profile_version`.execute(db);
  await sql`DROP TABLE etl_profile_version`.execute(db);
}
