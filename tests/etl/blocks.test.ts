import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadFile, type BatchSummary } from "../../etl/load/load-file.js";
import { RowStager } from "../../etl/load/stage-row.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb, fixture, snapshot, TODAY } from "./helpers.js";

/**
 * Job lines are merged block by block while the file is still being read, and the whole-file checks
 * run afterwards, putting back what they reject. These tests load the same files with one block per
 * file and with blocks of one or two rows, so every duplicate, put-back and correction crosses a block
 * boundary, and require the same warehouse and the same counts.
 */

const dir = mkdtempSync(path.join(os.tmpdir(), "etl-blocks-"));
/** The overlapping export with its corrected line R-102 repeated with other contents: the correction must be refused and undone. */
const conflictingCorrection = path.join(dir, "jobs-export-2-conflicting.csv");
writeFileSync(
  conflictingCorrection,
  readFileSync(fixture("jobs-export-2.csv"), "utf8").replace(/^(S5,R-102,1,.*)$/m, (line) => `${line}\n${line.replace("Relay contacts burnt", "Relay coil open")}`),
);

const files = ["machines.csv", "jobs-export-1.csv", "jobs-bad-rows.csv", "jobs-export-2.csv", "hours-backwards.csv"].map(fixture);

/** The warehouse, less what differs between any two databases: history ids (a sequence) and their timestamps. */
async function contents(t: TestDb): Promise<Record<string, unknown[]>> {
  const tables = await snapshot(t.pool);
  tables.fact_repair_line_history = tables.fact_repair_line_history.map((row) => {
    const { history_id: _, replaced_at: __, ...rest } = JSON.parse(row as string) as Record<string, unknown>;
    return rest;
  });
  return tables;
}

async function loadAll(t: TestDb, blockRows: number, list: string[]): Promise<Omit<BatchSummary, "durationMs">[]> {
  const out = [];
  for (const file of list) {
    const { durationMs: _, ...s } = await loadFile(t.pool, { path: file, loadedBy: "test", today: TODAY, blockRows });
    out.push(s);
  }
  return out;
}

describe("block-by-block merging of job lines", () => {
  const dbs: TestDb[] = [];
  afterAll(async () => {
    for (const t of dbs) await dropTestDb(t);
  });
  const fresh = async () => {
    const t = await freshTestDb();
    dbs.push(t);
    return t;
  };

  let whole: { summaries: Omit<BatchSummary, "durationMs">[]; tables: Record<string, unknown[]> };
  beforeAll(async () => {
    const t = await fresh();
    const summaries = await loadAll(t, 1_000_000, files);
    whole = { summaries, tables: await contents(t) };
  });

  for (const blockRows of [1, 2, 3]) {
    it(`gives the same warehouse and counts with blocks of ${blockRows} row(s) as with one block per file`, async () => {
      const t = await fresh();
      const summaries = await loadAll(t, blockRows, files);
      expect(summaries).toEqual(whole.summaries);
      expect(await contents(t)).toEqual(whole.tables);
    });
  }

  it("gives the same dimensions when the loader keeps no list of them and the merge finds them in the staged rows", async () => {
    const t = await fresh();
    const cap = RowStager.memberCap;
    RowStager.memberCap = -1;
    try {
      const summaries = await loadAll(t, 2, files);
      expect(summaries).toEqual(whole.summaries);
      expect(await contents(t)).toEqual(whole.tables);
    } finally {
      RowStager.memberCap = cap;
    }
  });

  it("refuses a correction that the file contradicts and puts the line back as it was, in any block size", async () => {
    const results = [];
    for (const blockRows of [1_000_000, 1]) {
      const t = await fresh();
      await loadAll(t, blockRows, [fixture("machines.csv"), fixture("jobs-export-1.csv")]);
      const before = await t.pool.query(`SELECT to_jsonb(f) - 'batch_id' AS row FROM fact_repair_line f WHERE ro_number = 'R-102'`);
      const [s] = await loadAll(t, blockRows, [conflictingCorrection]);
      const after = await t.pool.query(`SELECT to_jsonb(f) - 'batch_id' AS row, batch_id FROM fact_repair_line f WHERE ro_number = 'R-102'`);
      const history = await t.pool.query(`SELECT count(*)::int AS n FROM fact_repair_line_history`);
      const codes = await t.pool.query(
        `SELECT spn, fmi FROM fact_fault_code JOIN fact_repair_line USING (repair_line_key) WHERE ro_number = 'R-102' ORDER BY spn`,
      );
      expect(s).toMatchObject({ read: 4, inserted: 1, updated: 0, unchanged: 1, rejected: 2 });
      expect(after.rows[0].row).toEqual(before.rows[0].row);
      expect(after.rows[0].batch_id).not.toBe(String(s.batchId));
      expect(history.rows[0].n).toBe(0);
      results.push({ s: { ...s, batchId: 0, durationMs: 0 }, row: after.rows[0].row, codes: codes.rows });
    }
    expect(results[1]).toEqual(results[0]);
  });
});
