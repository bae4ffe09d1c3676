import { readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { EtlFatalError } from "../../etl/errors.js";
import { loadFile } from "../../etl/load/load-file.js";
import { upsertShops } from "../../etl/shops/upsert-shops.js";
import type { CaseExpectation } from "../fixtures/bad/make.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { dropTestDb, fixture, rejectsOf, TODAY } from "./helpers.js";

/**
 * Every file of tests/fixtures/bad (see make.ts there) loaded one after another into one warehouse:
 * - nothing crashes or hangs: a file loads, or fails whole with an EtlFatalError in words and leaves no trace;
 * - rows read = the file's non-blank lines after the header (or the count the case states), and
 *   read = inserted + updated + unchanged + rejected; every reject names its line and says why in words;
 * - no row already in the warehouse changes unless the file is a correction of it, and no shop is ever added.
 */
const corpusDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../fixtures/bad");
const manifest = JSON.parse(readFileSync(path.join(corpusDir, "manifest.json"), "utf8")) as CaseExpectation[];

/** Each table's rows by key, as JSON text. */
const TABLES: [table: string, key: string][] = [
  ["dim_shop", "shop_key"],
  ["dim_machine", "machine_key"],
  ["fact_repair_line", "repair_line_key"],
  ["fact_fault_code", "repair_line_key, spn, fmi"],
  ["fact_measurement", "measurement_key"],
  ["fact_meter_reading", "hour_reading_key"],
  ["fact_weather_day", "shop_key, date"],
];

async function rowsByKey(t: TestDb): Promise<Map<string, Map<string, string>>> {
  const out = new Map<string, Map<string, string>>();
  for (const [table, key] of TABLES) {
    const r = await t.pool.query<{ k: string; row: string }>(`SELECT (${key})::text AS k, to_jsonb(x)::text AS row FROM ${table} x`);
    out.set(table, new Map(r.rows.map((x) => [x.k, x.row])));
  }
  return out;
}

/** Data lines of a file as a person counts them: non-blank lines after the header, whatever ends them. */
function dataLines(bytes: Buffer): number {
  const lines = bytes.toString("latin1").split(/\r\n|\n|\r/).filter((l) => l.trim() !== "");
  return Math.max(0, lines.length - 1);
}

/** Words that only a database or a parser would use: none belongs in a reason shown to a shop manager. */
const MACHINE_WORDS = /sqlstate|syntax|violates|unsupported unicode|invalid input|out of range for type|invalid byte sequence|CSV_|undefined|\[object/i;

const tally = { files: 0, rows: 0, accepted: 0, rejected: 0, lost: 0, wronglyChanged: 0, fatal: 0 };

describe(`a corpus of ${manifest.length} hostile exports`, () => {
  let t: TestDb;

  beforeAll(async () => {
    t = await freshTestDb();
    await upsertShops(t.pool, [{ code: "S4", name: "Fourth" }, { code: "S5", name: "Fifth" }]);
    await loadFile(t.pool, { path: fixture("machines.csv"), loadedBy: "test", today: TODAY });
    await loadFile(t.pool, { path: fixture("jobs-export-1.csv"), loadedBy: "test", today: TODAY });
  });
  afterAll(async () => {
    // the figures the reliability notes quote
    console.log(`hostile corpus: ${JSON.stringify(tally)}`);
    await dropTestDb(t);
  });

  it("has at least 50 files, each with a stated expectation", () => {
    expect(manifest.length).toBeGreaterThanOrEqual(50);
    for (const c of manifest) expect(c.fatal !== undefined || c.accepted !== undefined, c.file).toBe(true);
  });

  for (const c of manifest) {
    it(`${c.file}: ${c.about}`, { timeout: 60_000 }, async () => {
      const file = path.join(corpusDir, c.file);
      const bytes = readFileSync(file);
      const before = await rowsByKey(t);
      tally.files++;
      if (c.fatal) {
        const err = await loadFile(t.pool, { path: file, kind: c.kind, loadedBy: "test", today: TODAY }).then(
          () => null,
          (e: unknown) => e,
        );
        expect(err).toBeInstanceOf(EtlFatalError);
        expect((err as EtlFatalError).code).toBe(c.fatal);
        expect((err as Error).message).not.toMatch(MACHINE_WORDS);
        expect(await rowsByKey(t)).toEqual(before);
        tally.fatal++;
        return;
      }
      const s = await loadFile(t.pool, { path: file, kind: c.kind, loadedBy: "test", today: TODAY });
      const rows = c.rows ?? dataLines(bytes);
      tally.rows += s.read;
      tally.accepted += s.inserted + s.updated + s.unchanged;
      tally.rejected += s.rejected;
      tally.lost += rows - s.read;
      expect(s.read, "rows read = data lines of the file").toBe(rows);
      expect(s.inserted + s.updated + s.unchanged + s.rejected).toBe(s.read);
      expect(s.inserted + s.updated + s.unchanged, "rows accepted").toBe(c.accepted);

      const rejects = await rejectsOf(t.pool, s.batchId);
      expect(rejects).toHaveLength(s.rejected);
      const totalLines = bytes.toString("latin1").split(/\r\n|\n|\r/).length;
      for (const r of rejects) {
        expect(r.row_number).toBeGreaterThanOrEqual(2);
        expect(r.row_number).toBeLessThanOrEqual(totalLines);
        expect(r.reason.length).toBeGreaterThan(10);
        expect(r.reason).not.toMatch(MACHINE_WORDS);
      }
      const byLine = Object.fromEntries(rejects.map((r) => [r.row_number, r.reason_code]));
      expect(byLine).toEqual(c.rejects ?? {});
      expect(s.mergedLines.map((m) => [m.first, m.last])).toEqual(c.merged ?? []);
      if (c.ignored) expect(s.header.ignored.map((x) => x.column)).toEqual(c.ignored);

      // nothing already stored changed, unless the file corrects it; no shop was added
      const after = await rowsByKey(t);
      expect([...after.get("dim_shop")!.keys()].sort()).toEqual([...before.get("dim_shop")!.keys()].sort());
      if (!c.correction) {
        for (const [table] of TABLES) {
          const was = before.get(table)!;
          const now = after.get(table)!;
          for (const [k, row] of was) {
            if (now.get(k) !== row) tally.wronglyChanged++;
            expect(now.get(k), `${table} ${k}`).toBe(row);
          }
        }
      }
    });
  }

  it("keeps what a correction without some optional columns does not say, and changes what it does", async () => {
    const r = await t.pool.query(
      `SELECT ro_number, complaint, hour_meter::float8 AS hour_meter, ambient_temp_c::float8 AS ambient, supplier_lot, labor_hours::float8 AS labor_hours
       FROM fact_repair_line WHERE ro_number IN ('R-100', 'R-101') ORDER BY ro_number`,
    );
    // as jobs-export-1.csv stored them: the corrections lacked the complaint, hour meter and lot columns and garbled the ambient one
    expect(r.rows).toEqual([
      { ro_number: "R-100", complaint: "Hard start", hour_meter: 4020, ambient: -12, supplier_lot: "BT-2109", labor_hours: 2.0 },
      { ro_number: "R-101", complaint: "Leak", hour_meter: 700, ambient: null, supplier_lot: null, labor_hours: 1.0 },
    ]);
    // R-100's labour was corrected to 2.5 h and back to 2.0 h: two versions in its history
    const h = await t.pool.query<{ n: number }>(
      `SELECT count(*)::int AS n FROM fact_repair_line_history h JOIN fact_repair_line f USING (repair_line_key) WHERE f.ro_number = 'R-100'`,
    );
    expect(h.rows[0].n).toBe(2);
    // R-102 was opened a day later by a file without close dates: a close date before the opening cannot stand
    const r102 = await t.pool.query(`SELECT opened_date::text AS opened, closed_date FROM fact_repair_line WHERE ro_number = 'R-102'`);
    expect(r102.rows).toEqual([{ opened: "2024-01-08", closed_date: null }]);
  });

  it("stores text that means something to SQL, a spreadsheet or the COPY format exactly as it came", async () => {
    const r = await t.pool.query<{ complaint: string; cause: string }>(
      `SELECT complaint, cause FROM fact_repair_line WHERE complaint LIKE '%DROP TABLE%' OR complaint LIKE '=HYPERLINK%' OR complaint LIKE 'C:%' ORDER BY complaint`,
    );
    expect(r.rows.map((x) => x.complaint)).toEqual([`'); DROP TABLE fact_repair_line; --`, "=HYPERLINK(\"http://example.invalid\",\"x\")", "C:\\shop\\N\tcold\\t"]);
    const w = await t.pool.query<{ complaint: string }>(`SELECT complaint FROM fact_repair_line WHERE complaint LIKE '%caf%' LIMIT 1`);
    expect(w.rows[0].complaint).toBe("Hard start at -8 ° C, café");
  });
});
