import { copyFileSync, mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { EtlFatalError } from "../../etl/errors.js";
import { loadFile } from "../../etl/load/load-file.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { count, dropTestDb, fixture, snapshot, TODAY } from "./helpers.js";

const opts = (file: string) => ({ path: fixture(file), loadedBy: "test", today: TODAY });

describe("loadFile idempotency and atomicity", () => {
  let t: TestDb;
  beforeEach(async () => {
    t = await freshTestDb();
    await loadFile(t.pool, opts("machines.csv"));
  });
  afterEach(async () => dropTestDb(t));

  it("changes no table when the same files are loaded a second time", async () => {
    await loadFile(t.pool, opts("jobs-bad-rows.csv"));
    await loadFile(t.pool, opts("jobs-export-1.csv"));
    const before = await snapshot(t.pool);
    const again = await loadFile(t.pool, opts("jobs-export-1.csv"));
    const machinesAgain = await loadFile(t.pool, opts("machines.csv"));
    expect(again).toMatchObject({ status: "already_loaded", read: 3, inserted: 0, updated: 0, unchanged: 3, rejected: 0 });
    expect(machinesAgain).toMatchObject({ status: "already_loaded", unchanged: 3 });
    expect(await snapshot(t.pool)).toEqual(before);
  });

  it("treats a renamed copy of a loaded file as already loaded, by its sha256", async () => {
    await loadFile(t.pool, opts("jobs-export-1.csv"));
    const dir = mkdtempSync(path.join(os.tmpdir(), "etl-"));
    const copy = path.join(dir, "renamed.csv");
    copyFileSync(fixture("jobs-export-1.csv"), copy);
    const s = await loadFile(t.pool, { path: copy, loadedBy: "test", today: TODAY });
    expect(s).toMatchObject({ status: "already_loaded", file: "renamed.csv", unchanged: 3 });
  });

  it("updates a corrected row from an overlapping later export, keeps its prior version in history and leaves the rest unchanged", async () => {
    const first = await loadFile(t.pool, opts("jobs-export-1.csv"));
    const unchangedBefore = await t.pool.query(`SELECT to_jsonb(f)::text AS row FROM fact_repair_line f WHERE ro_number = 'R-101'`);
    const s = await loadFile(t.pool, opts("jobs-export-2.csv"));
    expect(s).toMatchObject({ read: 3, inserted: 1, updated: 1, unchanged: 1, rejected: 0 });

    const r = await t.pool.query(`SELECT cause, closed_date, labor_hours, batch_id, first_batch_id FROM fact_repair_line WHERE ro_number = 'R-102'`);
    expect(r.rows[0]).toEqual({ cause: "Relay contacts burnt", closed_date: "2024-01-08", labor_hours: "0.90", batch_id: String(s.batchId), first_batch_id: String(first.batchId) });
    const h = await t.pool.query(`SELECT prior_row->>'cause' AS cause, prior_batch_id, replaced_by_batch FROM fact_repair_line_history`);
    expect(h.rows).toEqual([{ cause: "Relay stuck", prior_batch_id: String(first.batchId), replaced_by_batch: String(s.batchId) }]);
    const codes = await t.pool.query(
      `SELECT spn, fmi FROM fact_fault_code JOIN fact_repair_line USING (repair_line_key) WHERE ro_number = 'R-102' ORDER BY spn`,
    );
    expect(codes.rows).toEqual([{ spn: 520210, fmi: 5 }, { spn: 520211, fmi: 5 }]);
    const unchangedAfter = await t.pool.query(`SELECT to_jsonb(f)::text AS row FROM fact_repair_line f WHERE ro_number = 'R-101'`);
    expect(unchangedAfter.rows).toEqual(unchangedBefore.rows);
  });

  it("applies overlapping exports in the order given, so the later file's version of a corrected line wins", async () => {
    await loadFile(t.pool, opts("jobs-export-2.csv"));
    await loadFile(t.pool, opts("jobs-export-1.csv"));
    const r = await t.pool.query(`SELECT ro_number, cause FROM fact_repair_line ORDER BY ro_number`);
    expect(r.rows).toEqual([
      { ro_number: "R-100", cause: "Plug open" },
      { ro_number: "R-101", cause: "Hose chafed" },
      { ro_number: "R-102", cause: "Relay stuck" },
      { ro_number: "R-103", cause: "Hose worn" },
    ]);
  });

  for (const hook of ["afterStaging", "beforeCommit"] as const) {
    it(`leaves no trace of the file but a failed batch when the load fails at ${hook}`, async () => {
      const before = await snapshot(t.pool);
      await expect(
        loadFile(t.pool, {
          ...opts("jobs-export-1.csv"),
          hooks: { [hook]: async () => { throw new Error("disk full (simulated)"); } },
        }),
      ).rejects.toThrow("disk full (simulated)");
      expect(await snapshot(t.pool)).toEqual(before);
      const b = await t.pool.query(`SELECT status, error_message, rows_read FROM etl_batch WHERE file_name = 'jobs-export-1.csv'`);
      expect(b.rows).toEqual([{ status: "failed", error_message: "disk full (simulated)", rows_read: 0 }]);
      const stages = await t.pool.query(`SELECT relname FROM pg_class WHERE relname LIKE 'etl_stage_%'`);
      expect(stages.rows).toEqual([]);
      const retry = await loadFile(t.pool, opts("jobs-export-1.csv"));
      expect(retry).toMatchObject({ status: "loaded", inserted: 3 });
    });
  }

  it("drops a staging table that a killed load left behind, and keeps the table of a live one", async () => {
    const { default: pg } = await import("pg");
    const live = new pg.Client({ connectionString: t.url });
    await live.connect();
    await live.query(`SELECT pg_advisory_lock(hashtext('etl_stage_990001'))`);
    await live.query(`CREATE UNLOGGED TABLE etl_stage_990001 (row_no integer)`);
    await t.pool.query(`CREATE UNLOGGED TABLE etl_stage_990002 (row_no integer)`); // nobody holds its lock
    await loadFile(t.pool, opts("jobs-export-1.csv"));
    const left = await t.pool.query(`SELECT relname FROM pg_class WHERE relname LIKE 'etl_stage_%' ORDER BY 1`);
    expect(left.rows.map((r) => r.relname)).toEqual(["etl_stage_990001"]);
    await live.end();
  });

  const fatal: [string, () => Parameters<typeof loadFile>[1], string, RegExp][] = [
    ["an unreadable file", () => ({ path: fixture("no-such-file.csv"), loadedBy: "test" }), "FILE_UNREADABLE", /cannot read .*no-such-file\.csv/],
    ["a directory", () => ({ path: fixture(""), loadedBy: "test" }), "FILE_UNREADABLE", /not a regular file/],
    ["an unknown profile", () => ({ ...opts("jobs-export-1.csv"), profile: "no-such-profile" }), "UNKNOWN_PROFILE", /unknown profile "no-such-profile"/],
    ["a profile of another kind", () => ({ ...opts("jobs-export-1.csv"), profile: "generic-jobs", kind: "machines" }), "WRONG_KIND", /reads jobs exports, not machines/],
    ["a file of another kind", () => ({ ...opts("jobs-export-1.csv"), kind: "weather" }), "WRONG_KIND", /looks like a jobs export/],
    ["a header no profile knows", () => opts("not-an-export.csv"), "HEADER_NOT_RECOGNISED", /does not match any profile/],
    ["a named profile whose columns are missing", () => ({ ...opts("jobs-export-1.csv"), profile: "alder-jobs" }), "HEADER_NOT_RECOGNISED", /lacks "Store", "RO#"/],
  ];
  for (const [what, o, code, message] of fatal) {
    it(`refuses ${what} with a one-line message and writes nothing`, async () => {
      const before = await snapshot(t.pool);
      const batches = await count(t.pool, "etl_batch");
      const err = await loadFile(t.pool, o()).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(EtlFatalError);
      expect((err as EtlFatalError).code).toBe(code);
      expect((err as Error).message).toMatch(message);
      expect((err as Error).message).not.toContain("\n");
      expect(await snapshot(t.pool)).toEqual(before);
      expect(await count(t.pool, "etl_batch")).toBe(batches);
    });
  }
});
