import { sql, type Kysely } from "kysely";

// One row per user: when they last looked at the Overview and which clusters it showed them, so the next
// visit can say which clusters are new. A "visit" ends after a pause (see server/db/queries/overview.ts).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE app_user_visit (
      sub                  text PRIMARY KEY,
      last_request_at      timestamptz NOT NULL,
      current_cluster_ids  text[] NOT NULL DEFAULT '{}',
      previous_visit_at    timestamptz,
      previous_cluster_ids text[]
    )
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE app_user_visit`.execute(db);
}
