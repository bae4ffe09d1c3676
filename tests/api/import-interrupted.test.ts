import { spawn } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash } from "node:crypto";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import type { Import } from "../../shared/schemas/imports.js";
import { loadFile } from "../../etl/index.js";
import { runLoad } from "../../server/services/imports/import-jobs.js";
import { appOver, testApp, type TestApp } from "../helpers/test-app.js";
import { bigJobsFile, count, sample } from "../etl/helpers.js";

// A browser upload's load interrupted by a server stop (the job's process killed outright: no catch, no
// ROLLBACK sent) leaves no batch and no row of the file; the job queue then runs the job again (its lease
// expired), and the retry loads the file whole with counts that add up.

const root = path.resolve(import.meta.dirname, "../..");
const ORIGIN = "http://127.0.0.1:8080";
const ROWS = 50_000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let t: TestApp;
let app: ReturnType<typeof appOver>;
let admin: string;
let spool: string;
let work: string;
let file: string;

beforeAll(async () => {
  t = await testApp();
  spool = mkdtempSync(path.join(os.tmpdir(), "imports-interrupted-"));
  work = mkdtempSync(path.join(os.tmpdir(), "imports-interrupted-file-"));
  app = appOver(t, { imports: { spoolDir: spool, maxUploadBytes: 64 * 1024 * 1024 } });
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin" });
  await loadFile(t.pool, { path: sample("generic-machines.csv"), loadedBy: "test" });
  const known = await t.pool.query<{ serial: string; shop: string; hours: string }>(
    `SELECT m.serial, s.shop_code AS shop, m.delivery_hours AS hours FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key ORDER BY m.serial`,
  );
  file = path.join(work, "big-jobs.csv");
  bigJobsFile(file, ROWS, known.rows.map((m) => ({ ...m, hours: Number(m.hours) })));
}, 300_000);
afterAll(async () => {
  await t?.drop();
  for (const d of [spool, work]) if (d) rmSync(d, { recursive: true, force: true });
});

async function settle(id: string, busy: string[]): Promise<Import> {
  for (let i = 0; i < 1200; i++) {
    const r = await request(app).get(apiPaths.importItem(id)).set("Cookie", admin).expect(200);
    if (!busy.includes(r.body.status)) return r.body as Import;
    await sleep(250);
  }
  throw new Error(`upload ${id} never settled`);
}

describe("an upload's load interrupted by a server stop", () => {
  it("keeps no batch and no row of the file, and the job's retry loads it whole", async () => {
    const up = await request(app).post(apiPaths.imports()).set("Cookie", admin).set("Origin", ORIGIN).attach("files", readFileSync(file), "big-jobs.csv");
    expect(up.status).toBe(201);
    const id = (up.body.imports as Import[])[0].id;
    expect((await settle(id, ["checking"])).status).toBe("ready");
    const sha = createHash("sha256").update(readFileSync(file)).digest("hex");
    const factsBefore = await count(t.pool, "fact_repair_line");
    const batchesBefore = await count(t.pool, "etl_batch");

    // the load, as a job worker runs it, in a process of its own
    await t.pool.query(`UPDATE etl_upload SET status = 'queued' WHERE upload_id = $1`, [id]);
    const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "tests/helpers/run-import-load.ts"), t.url, id, spool], { cwd: root, stdio: "ignore" });
    const exited = new Promise<void>((resolve) => child.on("exit", () => resolve()));
    // stopped once it has read part of the file (its progress is written every second)
    let read = 0;
    for (let i = 0; i < 600 && read === 0; i++) {
      await sleep(100);
      const p = await t.pool.query<{ progress: { rowsRead?: number } | null; status: string }>(`SELECT progress, status FROM etl_upload WHERE upload_id = $1`, [id]);
      read = p.rows[0].progress?.rowsRead ?? 0;
      expect(p.rows[0].status).not.toBe("loaded");
    }
    expect(read).toBeGreaterThan(0);
    expect(read).toBeLessThan(ROWS);
    child.kill("SIGKILL");
    await exited;
    // the server's end of the killed connections: their transaction rolls back once PostgreSQL sees them gone
    for (let i = 0; i < 100; i++) {
      const n = await t.pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM pg_stat_activity WHERE datname = current_database() AND state = 'idle in transaction'`);
      if (n.rows[0].n === 0) break;
      await sleep(100);
    }
    expect(await count(t.pool, "fact_repair_line")).toBe(factsBefore);
    expect(await count(t.pool, "etl_batch")).toBe(batchesBefore);
    expect((await t.pool.query(`SELECT 1 FROM etl_batch WHERE sha256 = $1`, [sha])).rows).toEqual([]);
    // the upload still says it was loading: the job queue will run it again
    expect((await t.pool.query<{ status: string }>(`SELECT status FROM etl_upload WHERE upload_id = $1`, [id])).rows[0].status).toBe("loading");

    // the retry (pg-boss runs the job again when its lease expires) starts from the file again
    await runLoad({ db: t.db, pool: t.pool, spoolDir: spool }, id);
    const done = await settle(id, ["queued", "loading"]);
    expect(done.status).toBe("loaded");
    const batches = await t.pool.query<{ status: string; rows_read: number; rows_inserted: number; rows_updated: number; rows_unchanged: number; rows_rejected: number }>(
      `SELECT status, rows_read, rows_inserted, rows_updated, rows_unchanged, rows_rejected FROM etl_batch WHERE sha256 = $1`,
      [sha],
    );
    expect(batches.rows.length).toBe(1);
    const b = batches.rows[0];
    expect(b).toMatchObject({ status: "loaded", rows_read: ROWS });
    expect(b.rows_inserted + b.rows_updated + b.rows_unchanged + b.rows_rejected).toBe(ROWS);
    expect(await count(t.pool, "fact_repair_line")).toBe(factsBefore + b.rows_inserted);
  }, 600_000);
});
