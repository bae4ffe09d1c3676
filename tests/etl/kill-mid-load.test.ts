import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { bigJobsFile, count, dropTestDb, runEtlCli, sample } from "./helpers.js";

// A load killed outright (SIGKILL: no catch, no finally, no ROLLBACK sent) part-way through a large file
// leaves nothing of that file behind, and running the same load again finishes it whole.

const root = path.resolve(import.meta.dirname, "../..");
const ROWS = 50_000; // two staging blocks: the kill lands after the first is staged
const APP = "etl-kill-mid-load";
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe("npm run etl -- load, killed mid-load", () => {
  let t: TestDb;
  let dir: string;
  let file: string;
  let sha: string;
  beforeAll(async () => {
    t = await freshTestDb();
    dir = mkdtempSync(path.join(tmpdir(), "ironledger-kill-"));
    file = path.join(dir, "big-jobs.csv");
    const machines = await runEtlCli(t.url, ["load", "--json", sample("generic-machines.csv")]);
    expect(machines.code).toBe(0);
    const known = await t.pool.query<{ serial: string; shop: string; hours: string }>(
      `SELECT m.serial, s.shop_code AS shop, m.delivery_hours AS hours FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key ORDER BY m.serial`,
    );
    expect(known.rows.length).toBeGreaterThan(3);
    bigJobsFile(file, ROWS, known.rows.map((m) => ({ ...m, hours: Number(m.hours) })));
    sha = createHash("sha256").update(readFileSync(file)).digest("hex");
  }, 120_000);
  afterAll(async () => {
    if (t) await dropTestDb(t);
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  const stagingTables = async () =>
    (await t.pool.query<{ name: string }>(`SELECT relname AS name FROM pg_class WHERE relname ~ '^etl_stage_[0-9]+$'`)).rows.map((r) => r.name);
  const loadSessions = async () =>
    (await t.pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM pg_stat_activity WHERE application_name = $1`, [APP])).rows[0].n;

  it("keeps no row or batch of the file when the process is killed, and a rerun loads it whole with counts that add up", async () => {
    const factsBefore = await count(t.pool, "fact_repair_line");
    const batchesBefore = await count(t.pool, "etl_batch");
    const url = new URL(t.url);
    url.searchParams.set("application_name", APP);
    const child = spawn(process.execPath, ["--import", "tsx", "etl/cli.ts", "load", "--json", file], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: url.toString() },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let stdout = "";
    child.stdout.on("data", (c: Buffer) => (stdout += c.toString()));
    const exited = new Promise<NodeJS.Signals | null>((resolve) => child.on("exit", (_code, signal) => resolve(signal)));

    // the staging table fills by COPY in autocommit, outside the load's transaction: once it holds rows the load
    // is well under way (its batch row and merged blocks are in the open transaction, invisible from here)
    let staged = 0;
    for (let i = 0; i < 600 && staged === 0 && child.exitCode === null; i++) {
      await sleep(50);
      const [name] = await stagingTables();
      if (name) staged = (await t.pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM ${name}`)).rows[0].n;
    }
    expect(staged).toBeGreaterThan(0);
    // not committed yet: the batch row and the facts appear only at COMMIT
    expect(stdout).not.toMatch(/"event":"summary"/);
    expect((await t.pool.query(`SELECT 1 FROM etl_batch WHERE sha256 = $1`, [sha])).rows).toEqual([]);
    child.kill("SIGKILL");
    expect(await exited).toBe("SIGKILL");

    // the server notices the dead client and rolls its transaction back
    for (let i = 0; i < 300 && (await loadSessions()) > 0; i++) await sleep(100);
    expect(await loadSessions()).toBe(0);
    expect(await count(t.pool, "fact_repair_line")).toBe(factsBefore);
    const left = await t.pool.query(`SELECT status FROM etl_batch WHERE sha256 = $1`, [sha]);
    expect(left.rows).toEqual([]);
    expect(await count(t.pool, "etl_batch")).toBe(batchesBefore);

    const rerun = await runEtlCli(t.url, ["load", "--json", file]);
    expect(rerun.stderr).toBe("");
    expect(rerun.code).toBe(0);
    const summary = rerun.stdout.trim().split("\n").map((l) => JSON.parse(l)).find((l) => l.event === "summary");
    expect(summary).toMatchObject({ kind: "jobs", read: ROWS });
    expect(summary.inserted + summary.updated + summary.unchanged + summary.rejected).toBe(summary.read);
    expect(summary).toMatchObject({ inserted: ROWS, rejected: 0 });
    expect(await count(t.pool, "fact_repair_line")).toBe(factsBefore + summary.inserted);
    const batches = await t.pool.query(`SELECT status, rows_read FROM etl_batch WHERE sha256 = $1`, [sha]);
    expect(batches.rows).toEqual([{ status: "loaded", rows_read: ROWS }]);
    expect(await stagingTables()).toEqual([]);
  }, 300_000);
});
