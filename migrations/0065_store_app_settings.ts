import { sql, type Kysely } from "kysely";

// Group-wide settings an administrator sets once (the group's currency first), one row per key, and every
// change kept as a sentence in app_setting_event with who made it and when.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE app_setting (
      key         text PRIMARY KEY CHECK (key IN ('currency')),
      value       text NOT NULL,
      set_at      timestamptz NOT NULL DEFAULT now(),
      set_by_sub  text NOT NULL,
      set_by_name text NOT NULL
    )
  `.execute(db);
  await sql`
    CREATE TABLE app_setting_event (
      event_id   bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      key        text NOT NULL,
      at         timestamptz NOT NULL DEFAULT now(),
      old_value  text,
      new_value  text NOT NULL,
      actor_sub  text NOT NULL,
      actor_name text NOT NULL,
      sentence   text NOT NULL
    )
  `.execute(db);
  await sql`CREATE INDEX app_setting_event_by_key ON app_setting_event (key, at DESC, event_id DESC)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE app_setting_event`.execute(db);
  await sql`DROP TABLE app_setting`.execute(db);
}
