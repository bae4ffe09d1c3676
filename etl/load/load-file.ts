/**
 * Loads one export file into the warehouse. This is the ETL's public entry point: the CLI (etl/cli.ts),
 * the server's upload route and the demo loader call it.
 *
 *   loadFile(pool: pg.Pool | string, options: LoadFileOptions): Promise<BatchSummary>
 *
 * - `pool` is a pg.Pool (e.g. the one createDb returns) or a connection string; one client is used per file.
 * - options: { path, kind?, profile?, shop?, loadedBy, onProgress?, today?, hooks? }. Without `profile` the
 *   profile is detected from the header (among profiles of `kind`, when given). `shop` fills the shop column
 *   of single-shop exports that have none.
 * - Stages: stream the file (fs → sha256 → iconv-lite → csv-parse), map the header, validate and convert
 *   each row (etl/transform), COPY every row — rejected ones too — into a temp staging table, then merge
 *   set-wise into dimensions and facts. All of it runs in ONE transaction, so a failure leaves no row of
 *   the file behind; the attempt is then recorded as a 'failed' batch with its error message.
 * - Idempotent: a file whose sha256 was loaded before is recorded as an 'already_loaded' batch with every
 *   row unchanged; otherwise rows whose natural key and content hash match the warehouse are unchanged,
 *   rows with a new hash update the fact (repair lines keep the prior version in fact_repair_line_history).
 * - Counting: read = inserted + updated + unchanged + rejected, always. Exact duplicate lines within a file
 *   count as rejected ("duplicate_in_file") after the first copy; conflicting copies are all rejected.
 * - Throws EtlFatalError (unreadable file, unknown profile, wrong kind, header not recognised) before
 *   anything is written.
 */
import { createHash } from "node:crypto";
import path from "node:path";
import pg from "pg";
import { EtlFatalError } from "../errors.js";
import { layouts } from "../layouts.js";
import type { ExportKind, Profile } from "../profiles/profile-schema.js";
import { detectProfile, getProfile, mapHeader, missingRequiredColumns } from "../profiles/registry.js";
import { checkReadable, headerCells, readCsv, readHead } from "../sources/read-csv.js";
import { columnLabel, missingFields } from "../sources/row-schemas.js";
import { FieldReader } from "../transform/fields.js";
import { transformHours } from "../transform/hours.js";
import { transformJob } from "../transform/jobs.js";
import { transformMachine } from "../transform/machines.js";
import { transformMeasurement } from "../transform/measurements.js";
import { RowRejected } from "../transform/reject.js";
import { transformWeather } from "../transform/weather.js";
import { ensureDates, seedReference, storeRejects, type MergeCounts } from "./merge-common.js";
import { mergeJobs } from "./merge-jobs.js";
import { mergeHours, mergeMachines, mergeMeasurements, mergeWeather } from "./merge-others.js";
import { createStage, StageWriter } from "./staging.js";

export interface LoadProgress {
  phase: "reading" | "merging" | "done";
  rowsRead: number;
  bytesRead: number;
  totalBytes: number;
}

export interface LoadFileOptions {
  path: string;
  kind?: ExportKind;
  /** profile id (etl/profiles/<id>.json); detected from the header when absent */
  profile?: string;
  /** shop code for exports without a shop column */
  shop?: string;
  /** who loaded it (user name or "cli:<login>") */
  loadedBy: string;
  onProgress?: (p: LoadProgress) => void;
  /** 'YYYY-MM-DD'; dates after it are rejected as future. Defaults to the current UTC date. */
  today?: string;
  /** test seams */
  hooks?: {
    /** after every row is in the staging table, before any merge */
    afterStaging?: (client: pg.PoolClient) => Promise<void>;
    /** after the merges, just before COMMIT */
    beforeCommit?: (client: pg.PoolClient) => Promise<void>;
  };
}

export interface BatchSummary {
  batchId: number;
  file: string;
  sha256: string;
  kind: ExportKind;
  profile: string;
  shop: string | null;
  status: "loaded" | "already_loaded";
  read: number;
  inserted: number;
  updated: number;
  unchanged: number;
  rejected: number;
  durationMs: number;
}

type Transform = (f: FieldReader, shop: string | undefined) => Record<string, unknown>;

const transforms = {
  machines: transformMachine,
  jobs: transformJob,
  measurements: transformMeasurement,
  weather: transformWeather,
  hours: transformHours,
} as unknown as Record<ExportKind, Transform>;

const merges: Record<ExportKind, (c: pg.PoolClient, batchId: number) => Promise<MergeCounts>> = {
  machines: mergeMachines,
  jobs: mergeJobs,
  measurements: mergeMeasurements,
  weather: mergeWeather,
  hours: mergeHours,
};

/** The canonical column that names the shop in each kind, filled from --shop or the profile when blank. */
const SHOP_COLUMN: Partial<Record<ExportKind, string>> = { machines: "home_shop", jobs: "shop_code", measurements: "shop_code", weather: "shop_code" };

const DATE_COLUMNS: Record<ExportKind, string[]> = {
  machines: ["build_date", "delivery_date", "block_heater_date"],
  jobs: ["opened_date", "closed_date", "part_ordered_date", "part_received_date"],
  measurements: [],
  weather: ["date"],
  hours: ["reading_date"],
};

/** Profile and header for a file, or a fatal error that names the problem. */
export function resolveProfile(filePath: string, opts: Pick<LoadFileOptions, "kind" | "profile" | "shop">): { profile: Profile; header: string[] } {
  checkReadable(filePath);
  const head = readHead(filePath);
  if (head.length === 0) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${path.basename(filePath)} is empty`);
  const shopGiven = Boolean(opts.shop);
  let profile: Profile;
  if (opts.profile) {
    profile = getProfile(opts.profile);
    if (opts.kind && profile.kind !== opts.kind) {
      throw new EtlFatalError("WRONG_KIND", `profile ${profile.id} reads ${profile.kind} exports, not ${opts.kind}`);
    }
    const missing = missingRequiredColumns(profile, headerCells(head, profile), shopGiven);
    if (missing.length) {
      const names = missing.map((c) => `"${profile.columns[c] ?? c}"`).join(", ");
      throw new EtlFatalError("HEADER_NOT_RECOGNISED", `the header lacks ${names}, which profile ${profile.id} needs`);
    }
  } else {
    try {
      profile = detectProfile((p) => headerCells(head, p), opts.kind, shopGiven);
    } catch (e) {
      // a header that fits another kind's profile: say so rather than "not recognised"
      if (opts.kind && e instanceof EtlFatalError && e.code === "HEADER_NOT_RECOGNISED") {
        let other: Profile | null = null;
        try {
          other = detectProfile((p) => headerCells(head, p), undefined, shopGiven);
        } catch {
          /* not another kind either */
        }
        if (other) throw new EtlFatalError("WRONG_KIND", `${path.basename(filePath)} looks like a ${other.kind} export (profile ${other.id}), not ${opts.kind}`);
      }
      throw e;
    }
  }
  return { profile, header: headerCells(head, profile) };
}

function utcToday(): string {
  return new Date().toISOString().slice(0, 10);
}

/** ETL_TIMINGS=1 prints each statement's duration to stderr (for tuning; off by default). */
function traceQueries(client: pg.PoolClient): void {
  const original = client.query.bind(client) as (...a: unknown[]) => unknown;
  (client as unknown as { query: (...a: unknown[]) => unknown }).query = (...args: unknown[]) => {
    const t0 = Date.now();
    const r = original(...args);
    if (r instanceof Promise) {
      void r.then(() => process.stderr.write(`${Date.now() - t0} ms  ${String(args[0]).replace(/\s+/g, " ").slice(0, 90)}\n`), () => undefined);
    }
    return r;
  };
}

/** Loads one file; see the top of this module for the contract. */
export async function loadFile(target: pg.Pool | string, opts: LoadFileOptions): Promise<BatchSummary> {
  const started = Date.now();
  const { profile } = resolveProfile(opts.path, opts);
  const kind = profile.kind;
  const shop = opts.shop ?? profile.defaultShop;
  const totalBytes = checkReadable(opts.path);
  const today = opts.today ?? utcToday();
  const pool = typeof target === "string" ? new pg.Pool({ connectionString: target, max: 1 }) : target;
  if (typeof target === "string") pool.on("error", () => {}); // an idle client closed by the server is simply dropped
  const client = await pool.connect();
  if (process.env.ETL_TIMINGS) traceQueries(client);
  const startedAt = new Date();
  const fileName = path.basename(opts.path);
  let sha = "";
  try {
    await client.query("BEGIN");
    // bulk merges sort and hash the whole file; give them room (transaction-local)
    await client.query("SET LOCAL work_mem = '256MB'");
    await createStage(client, kind);
    const writer = new StageWriter(client, kind);
    const hash = createHash("sha256");
    let bytesRead = 0;
    let rowsRead = 0;
    let header: string[] | null = null;
    let colIndex = new Map<string, number>();
    let minDate: string | null = null;
    let maxDate: string | null = null;
    const shopCol = SHOP_COLUMN[kind];
    const transform = transforms[kind];
    const canonical = layouts[kind] as readonly string[];
    const dateCols = DATE_COLUMNS[kind];
    try {
      for await (const rec of readCsv(opts.path, profile, hash, (b) => (bytesRead = b))) {
        if (header === null) {
          header = rec.fields;
          colIndex = mapHeader(profile, header);
          continue;
        }
        rowsRead++;
        const raw = JSON.stringify(rec.fields);
        if (rec.error) {
          await writer.write({ rowNo: rec.line, raw, reject: { code: "unreadable_row", reason: `the row cannot be read as CSV (${rec.error})` } });
          continue;
        }
        if (rec.fields.length !== header.length) {
          await writer.write({
            rowNo: rec.line,
            raw,
            reject: { code: "wrong_column_count", reason: `the row has ${rec.fields.length} fields but the header has ${header.length}` },
          });
          continue;
        }
        const row: Record<string, string | undefined> = {};
        for (const c of canonical) {
          const i = colIndex.get(c);
          if (i !== undefined) row[c] = rec.fields[i];
        }
        if (shopCol && shop && !row[shopCol]?.trim()) row[shopCol] = shop;
        const missing = missingFields(kind, row);
        if (missing.length) {
          await writer.write({ rowNo: rec.line, raw, reject: { code: "missing_field", reason: `required ${missing.length > 1 ? "fields are" : "field is"} blank: ${missing.map(columnLabel).join(", ")}` } });
          continue;
        }
        try {
          const record = transform(new FieldReader(profile, today, row), shop);
          for (const c of dateCols) {
            const d = record[c] as string | null;
            if (d) {
              if (minDate === null || d < minDate) minDate = d;
              if (maxDate === null || d > maxDate) maxDate = d;
            }
          }
          await writer.write({ rowNo: rec.line, raw, record });
        } catch (e) {
          if (!(e instanceof RowRejected)) throw e;
          await writer.write({ rowNo: rec.line, raw, reject: { code: e.code, reason: e.reason } });
        }
        if (rowsRead % 5000 === 0) opts.onProgress?.({ phase: "reading", rowsRead, bytesRead, totalBytes });
      }
    } catch (e) {
      // the COPY must be ended before the client can report the reading error
      await writer.end().catch(() => undefined);
      throw e;
    }
    await writer.end();
    // temp tables are never auto-analysed; without statistics the merges get nested-loop plans
    await client.query("ANALYZE stg");
    if (header === null) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${fileName} has no header line`);
    sha = hash.digest("hex");
    opts.onProgress?.({ phase: "merging", rowsRead, bytesRead, totalBytes });
    await opts.hooks?.afterStaging?.(client);

    const before = await client.query<{ batch_id: number }>(`SELECT batch_id FROM etl_batch WHERE sha256 = $1 AND status = 'loaded'`, [sha]);
    const already = before.rows.length > 0;
    const ins = await client.query<{ batch_id: number }>(
      `INSERT INTO etl_batch (file_name, sha256, profile, kind, shop_code, loaded_by, started_at, status)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8) RETURNING batch_id`,
      [fileName, sha, profile.id, kind, shop ?? null, opts.loadedBy, startedAt, already ? "already_loaded" : "running"],
    );
    const batchId = Number(ins.rows[0].batch_id);
    let counts: MergeCounts & { rejected: number };
    if (already) {
      counts = { inserted: 0, updated: 0, unchanged: rowsRead, rejected: 0 };
    } else {
      await seedReference(client);
      await ensureDates(client, minDate, maxDate);
      const merged = await merges[kind](client, batchId);
      await storeRejects(client, batchId, header);
      const rej = await client.query<{ n: number }>(`SELECT count(*)::int AS n FROM stg WHERE reject_code IS NOT NULL`);
      counts = { ...merged, rejected: rej.rows[0].n };
    }
    await client.query(
      `UPDATE etl_batch SET finished_at = now(), rows_read = $2, rows_inserted = $3, rows_updated = $4, rows_unchanged = $5,
         rows_rejected = $6, status = CASE WHEN status = 'running' THEN 'loaded' ELSE status END
       WHERE batch_id = $1`,
      [batchId, rowsRead, counts.inserted, counts.updated, counts.unchanged, counts.rejected],
    );
    await opts.hooks?.beforeCommit?.(client);
    await client.query("COMMIT");
    opts.onProgress?.({ phase: "done", rowsRead, bytesRead, totalBytes });
    return {
      batchId,
      file: fileName,
      sha256: sha,
      kind,
      profile: profile.id,
      shop: shop ?? null,
      status: already ? "already_loaded" : "loaded",
      read: rowsRead,
      ...counts,
      durationMs: Date.now() - started,
    };
  } catch (e) {
    await client.query("ROLLBACK").catch(() => undefined);
    if (!(e instanceof EtlFatalError)) {
      await client
        .query(
          `INSERT INTO etl_batch (file_name, sha256, profile, kind, shop_code, loaded_by, started_at, finished_at, status, error_message)
           VALUES ($1, $2, $3, $4, $5, $6, $7, now(), 'failed', $8)`,
          [fileName, sha || "0".repeat(64), profile.id, kind, shop ?? null, opts.loadedBy, startedAt, (e as Error).message],
        )
        .catch(() => undefined);
    }
    throw e;
  } finally {
    client.release();
    if (typeof target === "string") await pool.end();
  }
}
