import { sql, type Kysely } from "kysely";

// The weekly digest by e-mail: each user's choice (on or off, and the weekday it comes on; ISO numbering,
// 1 = Monday … 7 = Sunday; a user without a row gets it on Mondays), and one row per user and ISO week once
// that week's digest has gone, so a second run of the job in the same week sends nothing again.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE digest_preference (
      sub        text PRIMARY KEY REFERENCES app_user (sub) ON DELETE CASCADE,
      enabled    boolean NOT NULL DEFAULT true,
      weekday    smallint NOT NULL DEFAULT 1 CHECK (weekday BETWEEN 1 AND 7),
      updated_at timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`
    CREATE TABLE digest_sent (
      sub        text NOT NULL REFERENCES app_user (sub) ON DELETE CASCADE,
      week       text NOT NULL CHECK (week ~ '^[0-9]{4}-W[0-9]{2}$'),
      sent_at    timestamptz NOT NULL DEFAULT now(),
      message_id text,
      PRIMARY KEY (sub, week)
    )
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE digest_sent`.execute(db);
  await sql`DROP TABLE digest_preference`.execute(db);
}
