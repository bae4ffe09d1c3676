import pg from "pg";
import { createHash, randomBytes } from "node:crypto";
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { loadDemo } from "../../server/demo/load-demo.js";
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
  return open(name);
}

function open(name: string): TestDb {
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

function sourceHash(): string {
  const root = path.resolve(import.meta.dirname, "../..");
  const h = createHash("sha256");
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.(ts|json)$/.test(e.name)) h.update(p.slice(root.length)).update(readFileSync(p));
    }
  };
  for (const d of ["etl", "migrations", "shared", "server/demo"]) walk(path.join(root, d));
  return h.digest("hex").slice(0, 12);
}

/**
 * The fixed anchor of the test demo world, so tests stay deterministic whatever day they run. 2025-07-01 is
 * the generator's own calendar (etl/demo/anchor.ts CALENDAR_ANCHOR): nothing moves, the history ends on
 * 2025-06-30, and tests that name demo dates (2024 months, the 2021 build window of the bad lot, the winter
 * 2022–23) read them as the scenario page states them.
 */
export const TEST_DEMO_ANCHOR = "2025-07-01";

/**
 * A fresh database holding the demo world at scale 1 (seed 1, anchor TEST_DEMO_ANCHOR). The first caller in a test cluster builds a
 * template (about a minute) under an advisory lock; everyone else clones it in seconds. The template's name
 * carries a hash of the ETL, generator and migration sources, so a change to them builds a new one.
 */
export async function freshDemoDb(): Promise<TestDb> {
  const template = `ironledger_demo_${sourceHash()}`;
  const admin = new pg.Client({ connectionString: adminUrl("postgres") });
  await admin.connect();
  try {
    await admin.query("SELECT pg_advisory_lock(4242)");
    const exists = await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [template]);
    if (exists.rowCount === 0) {
      await admin.query(`CREATE DATABASE ${template} TEMPLATE ${TEMPLATE_DB}`);
      const { db, pool } = createDb(adminUrl(template), 5);
      const dir = mkdtempSync(path.join(tmpdir(), "ironledger-demo-"));
      try {
        await loadDemo(db, pool, { dir, seed: 1, scale: 1, anchor: TEST_DEMO_ANCHOR });
      } catch (err) {
        await db.destroy();
        await admin.query(`DROP DATABASE IF EXISTS ${template} WITH (FORCE)`);
        throw err;
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
      await db.destroy();
    }
    const name = `t_${randomBytes(6).toString("hex")}`;
    await admin.query(`CREATE DATABASE ${name} TEMPLATE ${template}`);
    return open(name);
  } finally {
    await admin.query("SELECT pg_advisory_unlock(4242)").catch(() => {});
    await admin.end();
  }
}
