import { sql, type Kysely } from "kysely";

// An administrator keeps each user's access in Ironledger: roles and shops stored here replace the identity
// provider's claims for that user once set (both together; null while the provider's claims apply), and a
// deactivated user's sessions end and their sign-ins are refused. app_user.roles and app_user.shops stay the
// provider's claims as of the last sign-in (last_seen is the time of that sign-in). Every change is kept as a
// sentence in app_user_event, with who made it and when.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    ALTER TABLE app_user
      ADD COLUMN access_roles   text[],
      ADD COLUMN access_shops   text[],
      ADD COLUMN access_set_at  timestamptz,
      ADD COLUMN access_set_by  text,
      ADD COLUMN deactivated_at timestamptz,
      ADD COLUMN deactivated_by text,
      ADD CONSTRAINT app_user_access_together CHECK (
        (access_roles IS NULL) = (access_shops IS NULL) AND (access_roles IS NULL) = (access_set_at IS NULL)),
      ADD CONSTRAINT app_user_deactivated_together CHECK ((deactivated_at IS NULL) = (deactivated_by IS NULL))
  `.execute(db);
  await sql`
    CREATE TABLE app_user_event (
      event_id   bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      sub        text NOT NULL REFERENCES app_user (sub) ON DELETE CASCADE,
      at         timestamptz NOT NULL DEFAULT now(),
      kind       text NOT NULL CHECK (kind IN ('access', 'provider', 'deactivated', 'reactivated')),
      actor_sub  text NOT NULL,
      actor_name text NOT NULL,
      sentence   text NOT NULL
    )
  `.execute(db);
  await sql`CREATE INDEX app_user_event_by_user ON app_user_event (sub, at DESC, event_id DESC)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE app_user_event`.execute(db);
  await sql`
    ALTER TABLE app_user
      DROP CONSTRAINT app_user_deactivated_together,
      DROP CONSTRAINT app_user_access_together,
      DROP COLUMN deactivated_by, DROP COLUMN deactivated_at,
      DROP COLUMN access_set_by, DROP COLUMN access_set_at, DROP COLUMN access_shops, DROP COLUMN access_roles
  `.execute(db);
}
