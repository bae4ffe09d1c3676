import pg from "pg";
import { randomBytes } from "node:crypto";
import { createDb, type Db } from "../../server/db/database.js";
import { adminUrl, TEMPLATE_DB } from "./test-db-names.js";

export interface TestDb {
  db: Db;
  pool: pg.Pool;
  url: string;
  name: string;
  drop(): Promise<void>;
}

/** A fresh, fully migrated database cloned from the template built in global-setup. */
export async function freshTestDb(): Promise<TestDb> {
  const name = `t_${randomBytes(6).toString("hex")}`;
  const admin = new pg.Client({ connectionString: adminUrl("postgres") });
  await admin.connect();
  try {
    await admin.query(`CREATE DATABASE ${name} TEMPLATE ${TEMPLATE_DB}`);
  } finally {
    await admin.end();
  }
  const url = adminUrl(name);
  const { db, pool } = createDb(url, 5);
  return {
    db,
    pool,
    url,
    name,
    async drop() {
      await db.destroy();
      const c = new pg.Client({ connectionString: adminUrl("postgres") });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      await c.end();
    },
  };
}
