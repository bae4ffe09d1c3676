import pg from "pg";
import { Kysely, PostgresDialect } from "kysely";
import { migrateToLatest } from "../../server/db/migrate.js";
import { adminUrl, TEMPLATE_DB } from "./test-db-names.js";

/** Builds one migrated template database; each test file clones it (CREATE DATABASE … TEMPLATE). */
export default async function setup(): Promise<void> {
  const admin = new pg.Client({ connectionString: adminUrl("postgres") });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS ${TEMPLATE_DB} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${TEMPLATE_DB}`);
  await admin.end();
  const db = new Kysely<any>({ dialect: new PostgresDialect({ pool: new pg.Pool({ connectionString: adminUrl(TEMPLATE_DB) }) }) });
  try {
    await migrateToLatest(db);
  } finally {
    await db.destroy();
  }
}
