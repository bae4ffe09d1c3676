import { sql, type Kysely } from "kysely";

// Sessions (connect-pg-simple's layout) and the app's user directory mirror.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable("app_session")
    .addColumn("sid", "varchar", (c) => c.primaryKey())
    .addColumn("sess", "json", (c) => c.notNull())
    .addColumn("expire", sql`timestamp(6)`, (c) => c.notNull())
    .execute();
  await db.schema.createIndex("app_session_expire_idx").on("app_session").column("expire").execute();

  await db.schema
    .createTable("app_user")
    .addColumn("sub", "text", (c) => c.primaryKey())
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("email", "text")
    .addColumn("roles", sql`text[]`, (c) => c.notNull())
    .addColumn("shops", sql`text[]`, (c) => c.notNull())
    .addColumn("first_seen", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn("last_seen", "timestamptz", (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable("app_user").execute();
  await db.schema.dropTable("app_session").execute();
}
