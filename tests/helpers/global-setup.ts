import pg from "pg";
import { execFileSync } from "node:child_process";
import path from "node:path";
import { adminUrl, TEMPLATE_DB } from "./test-db-names.js";

const root = path.resolve(import.meta.dirname, "../..");

/**
 * Builds one migrated template database; each test file clones it (CREATE DATABASE … TEMPLATE).
 * The migrator runs in a child process with tsx, the same way `npm run db:migrate` runs it.
 */
export default async function setup(): Promise<void> {
  const admin = new pg.Client({ connectionString: adminUrl("postgres") });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS ${TEMPLATE_DB} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${TEMPLATE_DB}`);
  await admin.end();
  execFileSync(process.execPath, ["--import", "tsx", path.join(root, "scripts/migrate.ts")], {
    cwd: root,
    env: { ...process.env, DATABASE_URL: adminUrl(TEMPLATE_DB) },
    stdio: ["ignore", "ignore", "inherit"],
  });
}
