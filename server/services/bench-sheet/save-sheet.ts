/**
 * Saving a bench sheet: the sheet is written as small CSV files in Ironledger's generic layouts (measurements,
 * hours, and jobs for a line the shop has not exported yet) and each is loaded with the ETL's loadFile, so
 * validation, unit conversion, provenance, refusals in words and the load history are the ETL's own. The
 * batches are marked source = 'sheet' and loaded by the user.
 *
 * All or nothing: every file is first loaded as a dry run (checked and merged, then rolled back). Any refused
 * value ends the save with every refusal named by the sheet's field and nothing stored. Only then are the files
 * loaded for real, each refusing to commit should a row be refused after all (a concurrent load between the
 * check and the load). Two files are two transactions: a failure of the second after the first committed is
 * possible only if the database fails in between, and then the first file's readings stand as loaded.
 */
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import type pg from "pg";
import { stringify } from "csv-stringify/sync";
import { EtlFatalError, loadFile, refreshExposure, type BatchSummary } from "../../../etl/index.js";
import { HttpError } from "../../errors.js";
import type { Db } from "../../db/database.js";
import type { BenchRefusal } from "../../../shared/schemas/bench-sheet.js";
import { refusalsOf, type SheetRow } from "./sheet-rows.js";

export interface SheetFile {
  kind: "measurements" | "hours" | "jobs";
  profile: "generic-measurements" | "generic-hours" | "generic-jobs";
  columns: readonly string[];
  rows: readonly SheetRow<object>[];
}

export interface SheetLoadDeps {
  db: Db;
  pool: pg.Pool;
}

/** "2026-12-03 10-14-07": a file name's timestamp (no colons, for any file system). */
const stamp = (d: Date) => d.toISOString().slice(0, 19).replace("T", " ").replace(/:/g, "-");

/** 422 with every refused value; nothing was stored. */
export function sheetRefused(refused: BenchRefusal[]): HttpError {
  const n = refused.length;
  return new HttpError(
    422,
    "sheet_refused",
    `Nothing was saved: ${n === 1 ? "one value was" : `${n} values were`} refused. ${refused.map((r) => `${r.label} (${r.value}): ${r.reason}`).join("; ")}.`,
    { refused },
  );
}

/** A reject the dry run found, or one a real load would have committed, as a field of the sheet. */
class RefusedOnLoad extends Error {
  constructor(readonly rejects: { line: number; code: string; reason: string }[]) {
    super("a row was refused between the check and the load");
  }
}

/**
 * Loads the files as one save. `what` names the sheet in the batch's file name ("bench sheet R-1001/2 …").
 * Returns the summaries of the real loads; throws sheetRefused (422) when any value is refused.
 */
export async function loadSheetFiles(deps: SheetLoadDeps, files: readonly SheetFile[], what: string, loadedBy: string): Promise<BatchSummary[]> {
  const dir = await mkdtemp(path.join(tmpdir(), "bench-sheet-"));
  const when = stamp(new Date());
  try {
    const written = await Promise.all(
      files.filter((f) => f.rows.length > 0).map(async (f, i) => {
        const file = path.join(dir, `${i}-${f.kind}.csv`);
        const records = f.rows.map((r) => f.columns.map((c) => (r.row as Record<string, string>)[c] ?? ""));
        await writeFile(file, stringify([f.columns as string[], ...records], { record_delimiter: "\n" }));
        return { ...f, file, name: `bench sheet ${what} ${when} ${f.kind}.csv` };
      }),
    );
    const refused: BenchRefusal[] = [];
    for (const f of written) {
      const dry = await loadFile(deps.pool, {
        path: f.file, profile: f.profile, kind: f.kind, fileName: f.name, loadedBy, source: "sheet", dryRun: true, previewRows: f.rows.length + 1,
      });
      refused.push(...refusalsOf(f.rows, dry.preview?.rejects ?? [], f.kind));
    }
    if (refused.length) throw sheetRefused(refused);
    const done: BatchSummary[] = [];
    for (const f of written) {
      try {
        done.push(await loadFile(deps.pool, {
          path: f.file, profile: f.profile, kind: f.kind, fileName: f.name, loadedBy, source: "sheet",
          hooks: {
            beforeCommit: async (client) => {
              const r = await client.query<{ line: number; code: string; reason: string }>(
                `SELECT row_no AS line, reject_code AS code, reject_reason AS reason FROM stg WHERE reject_code IS NOT NULL ORDER BY row_no`,
              );
              if (r.rows.length) throw new RefusedOnLoad(r.rows);
            },
          },
        }));
      } catch (e) {
        if (e instanceof RefusedOnLoad) throw sheetRefused(refusalsOf(f.rows, e.rejects, f.kind));
        throw e;
      }
    }
    // what an upload's load does next (server/services/imports/import-jobs.ts): the derived exposure follows
    if (done.some((s) => s.inserted + s.updated > 0)) await refreshExposure(deps.db);
    return done;
  } catch (e) {
    if (e instanceof EtlFatalError) throw new HttpError(422, "sheet_refused", `Nothing was saved: ${e.message}`, { refused: [] });
    throw e;
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
