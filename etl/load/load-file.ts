/**
 * Loads one export file into the warehouse. This is the ETL's public entry point: the CLI (etl/cli.ts),
 * the server's upload route and the demo loader call it.
 *
 *   loadFile(pool: pg.Pool | string, options: LoadFileOptions): Promise<BatchSummary>
 *
 * - `pool` is a pg.Pool (e.g. the one createDb returns) or a connection string. A load takes two of the pool's
 *   connections: one for its transaction, one that fills the staging table by COPY (so a pool needs max ≥ 2).
 * - options: { path, kind?, profile?, shop?, loadedBy, onProgress?, today?, blockRows?, hooks? }. Without `profile` the
 *   profile is detected from the header (among profiles of `kind`, when given). Profiles are the latest versions
 *   stored in the warehouse (etl/profiles/profile-store.ts, seeded from etl/profiles/); the batch records the
 *   version it used. `shop` fills the shop column
 *   of single-shop exports that have none.
 * - Stages: hash the file (sha256) first, so a file loaded before is known before anything is read; then
 *   stream it (fs → iconv-lite for Windows-1252 → csv-parse, in blocks), map the header, validate and convert
 *   each row (etl/transform), add its content hash and surrogate keys (etl/load/stage-row.ts), and COPY
 *   every row — rejected ones too, with their raw fields and reason — into a temp staging table in blocks of
 *   25,000 rows (etl/load/staging.ts). Job lines are merged into the facts block by block while the next
 *   block is read (etl/load/merge-jobs.ts); the smaller kinds merge once every row is staged. The checks
 *   that need the whole file (duplicates, hour meters) run at the end and put back whatever they reject.
 *   All of it runs in ONE transaction, so a failure leaves no row of the file behind; the attempt is then
 *   recorded as a 'failed' batch with its error message.
 * - Idempotent: a file whose sha256 was loaded before by the same version of its profile is recorded as an
 *   'already_loaded' batch with every
 *   row unchanged; otherwise rows whose natural key and content hash match the warehouse are unchanged,
 *   rows with a new hash update the fact (repair lines keep the prior version in fact_repair_line_history).
 * - Counting: read = inserted + updated + unchanged + rejected, always. Exact duplicate lines within a file
 *   count as rejected ("duplicate_in_file") after the first copy; conflicting copies are all rejected.
 * - Throws EtlFatalError (unreadable file, unknown profile, wrong kind, header not recognised) before
 *   anything is written.
 */
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import path from "node:path";
import pg from "pg";
import { EtlFatalError } from "../errors.js";
import { profileSchema, type ExportKind, type Profile } from "../profiles/profile-schema.js";
import { profilesAt, type VersionedProfile } from "../profiles/profile-store.js";
import { detectProfile, getProfile, headerReport, missingRequiredColumns, type HeaderReport } from "../profiles/registry.js";
import { checkReadable, headerCells, readCsv, readHead, sniffEncoding } from "../sources/read-csv.js";
import { ensureDates, seedReference, storeRejects, type MergeCounts } from "./merge-common.js";
import { finishJobs, jobsBlock, prepareJobs, type BlockTally, type FileFacts } from "./merge-jobs.js";
import { mergeHours, mergeMachines, mergeMeasurements, mergeWeather } from "./merge-others.js";
import { freeTextColumns, RowStager, visibleText } from "./stage-row.js";
import { normaliseCode } from "../transform/values.js";
import { StagePipeline, StageTable, stageColumns } from "./staging.js";
import { etlPoolConfig } from "./timed-client.js";

export interface LoadProgress {
  phase: "reading" | "merging" | "done";
  rowsRead: number;
  bytesRead: number;
  totalBytes: number;
}

export interface LoadFileOptions {
  path: string;
  kind?: ExportKind;
  /** profile id (the latest stored version, etl/profiles/profile-store.ts); detected from the header when absent */
  profile?: string;
  /**
   * An unsaved profile to read the file with instead of the stored one of its id (only with dryRun: trying an
   * edit against a sample). It takes part in detection too.
   */
  profileDraft?: Profile;
  /** shop code for exports without a shop column */
  shop?: string;
  /** the name the batch records (default: the file's own name; an upload's spooled copy has another) */
  fileName?: string;
  /** who loaded it (user name or "cli:<login>") */
  loadedBy: string;
  /** where the file came from (etl_batch.source): a shop's export (the default) or a bench sheet the server wrote */
  source?: "export" | "sheet";
  onProgress?: (p: LoadProgress) => void;
  /** called before anything is loaded with what the header means to the profile (columns ignored and why, columns absent) */
  onHeader?: (report: HeaderNotes, profile: Profile) => void;
  /** 'YYYY-MM-DD'; dates after it are rejected as future. Defaults to the current UTC date. */
  today?: string;
  /**
   * Check the whole file exactly as a load would (every row check, the whole-file checks against the
   * warehouse, the merges) and then roll everything back: the summary counts what a load would do, with a
   * preview of `previewRows` rows and rejects. Nothing is stored, not even a batch row.
   */
  dryRun?: boolean;
  /** rows and rejects a dry run shows (default 20) */
  previewRows?: number;
  /** aborting it stops the load between blocks; nothing of the file stays (EtlFatalError "CANCELLED") */
  signal?: AbortSignal;
  /** rows per staging block (default 25,000); a test seam, so small files can be merged in several blocks */
  blockRows?: number;
  /** test seams */
  hooks?: {
    /** after every row is in the staging table and before the whole-file checks (jobs blocks are merged by then) */
    afterStaging?: (client: pg.PoolClient) => Promise<void>;
    /** after the merges, just before COMMIT */
    beforeCommit?: (client: pg.PoolClient) => Promise<void>;
  };
}

/** What the header and the first bytes meant, said before the load: columns ignored and why, optional columns absent, the encoding read in when not the profile's. */
export type HeaderNotes = Pick<HeaderReport, "ignored" | "absent"> & { encoding: string | null };

/** What a dry run shows: rows in the warehouse's units and codes, and rejects with their raw fields. */
export interface LoadPreview {
  /** the shops the file's accepted rows name (machines: home shops; hours: the machines' home shops), with row counts */
  shops: { code: string; rows: number }[];
  rows: ({ line: number } & Record<string, unknown>)[];
  rejects: { line: number; code: string; reason: string; raw: string[] }[];
}

export interface BatchSummary {
  batchId: number;
  file: string;
  sha256: string;
  kind: ExportKind;
  profile: string;
  /** the stored version of the profile that read the file; null for a draft tried in a dry run */
  profileVersion: number | null;
  shop: string | null;
  /** dry_run: everything was checked and merged as for a load, then rolled back (see LoadFileOptions.dryRun) */
  status: "loaded" | "already_loaded" | "dry_run";
  /** with dryRun: the first rows as they would land and the first rejects with their reasons */
  preview?: LoadPreview;
  /** header cells the profile does not read (and why), and its optional columns the file lacks */
  header: HeaderNotes;
  /** lines that a quote left open ran together, each then read on its own (see etl/sources/read-csv.ts) */
  mergedLines: { first: number; last: number }[];
  read: number;
  inserted: number;
  updated: number;
  unchanged: number;
  rejected: number;
  durationMs: number;
}

/**
 * Per kind: an optional merge per staged block (runs while the file is still being read) and the merge
 * that runs once every row is staged. Jobs merge block by block; the smaller kinds merge at the end.
 */
interface KindMerge {
  prepare?: (c: pg.PoolClient) => Promise<void>;
  block?: (c: pg.PoolClient, batchId: number, first: number, last: number, repeats: boolean, kept: readonly string[]) => Promise<BlockTally>;
  finish: (c: pg.PoolClient, batchId: number, blocks: BlockTally, file: FileFacts) => Promise<MergeCounts>;
}

const merges: Record<ExportKind, KindMerge> = {
  machines: { finish: mergeMachines },
  jobs: { prepare: prepareJobs, block: jobsBlock, finish: finishJobs },
  measurements: { finish: mergeMeasurements },
  weather: { finish: mergeWeather },
  hours: { finish: mergeHours },
};

const DEFAULT_BLOCK_ROWS = 25_000;

/** sha256 of a file's bytes, read once before the load so an already-loaded file is known up front. */
async function fileSha256(filePath: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(filePath, { highWaterMark: 1 << 20 })) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

/** Profile and header for a file, or a fatal error that names the problem. */
export function resolveProfile(
  filePath: string,
  opts: Pick<LoadFileOptions, "kind" | "profile" | "shop">,
  profiles?: Profile[],
): { profile: Profile; header: string[]; report: HeaderReport; readAs: Profile; encodingNote: string | null } {
  checkReadable(filePath);
  const head = readHead(filePath);
  if (head.length === 0) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${path.basename(filePath)} is empty`);
  const kindOfBytes = notText(head);
  if (kindOfBytes) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${path.basename(filePath)} is ${kindOfBytes}, not a CSV export; export the data as CSV text`);
  const shopGiven = Boolean(opts.shop);
  let profile: Profile;
  if (opts.profile) {
    profile = getProfile(opts.profile, profiles);
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
      profile = detectProfile((p) => headerCells(head, p), opts.kind, shopGiven, profiles);
    } catch (e) {
      // a header that fits another kind's profile: say so rather than "not recognised"
      if (opts.kind && e instanceof EtlFatalError && e.code === "HEADER_NOT_RECOGNISED") {
        let other: Profile | null = null;
        try {
          other = detectProfile((p) => headerCells(head, p), undefined, shopGiven, profiles);
        } catch {
          /* not another kind either */
        }
        if (other) throw new EtlFatalError("WRONG_KIND", `${path.basename(filePath)} looks like a ${other.kind} export (profile ${other.id}), not ${opts.kind}`);
      }
      throw e;
    }
  }
  const header = headerCells(head, profile);
  const report = headerReport(profile, header);
  if (report.duplicates.length) {
    const d = report.duplicates.map((x) => `"${x.column}" (columns ${x.positions.join(" and ")})`).join(", ");
    throw new EtlFatalError("DUPLICATE_COLUMN", `the header names ${d} more than once; which copy holds the values cannot be known, so nothing was loaded`);
  }
  const { encoding, note } = sniffEncoding(head, profile.encoding);
  return { profile, header, report, readAs: encoding === profile.encoding ? profile : { ...profile, encoding }, encodingNote: note };
}

/** What a file's first bytes say it is when that is plainly not CSV text; null when it may be. */
function notText(head: Buffer): string | null {
  const starts = (...b: number[]) => b.every((x, i) => head[i] === x);
  if (starts(0xff, 0xfe) || starts(0xfe, 0xff)) return "UTF-16 text (save it as UTF-8 or Windows-1252)";
  if (starts(0x50, 0x4b, 0x03, 0x04)) return "a ZIP archive (a spreadsheet workbook, or compressed)";
  if (starts(0x1f, 0x8b)) return "gzip-compressed";
  if (starts(0x25, 0x50, 0x44, 0x46)) return "a PDF document";
  if (starts(0xd0, 0xcf, 0x11, 0xe0)) return "an old-style spreadsheet or document";
  // text has few NUL bytes; binary data has many
  let nul = 0;
  const n = Math.min(head.length, 4096);
  for (let i = 0; i < n; i++) if (head[i] === 0) nul++;
  return nul > n / 10 ? "binary data" : null;
}

function utcToday(): string {
  return new Date().toISOString().slice(0, 10);
}

/**
 * Rows rejected by a whole-file check (a duplicate, an unknown machine, an hour meter going backwards) were
 * staged without their raw fields, as every accepted row is. Reads the file once more and fills them in,
 * a window of row numbers at a time so memory stays flat. Costs nothing when no such row exists.
 */
async function recoverRawRows(client: pg.PoolClient, filePath: string, profile: Profile, sha: string): Promise<void> {
  const WINDOW = 5000;
  const next = async (after: number) =>
    (await client.query<{ row_no: number }>(`SELECT row_no FROM stg WHERE raw IS NULL AND reject_code IS NOT NULL AND row_no > $1 ORDER BY row_no LIMIT ${WINDOW}`, [after]))
      .rows.map((r) => r.row_no);
  let wanted = await next(0);
  if (wanted.length === 0) return;
  const hash = createHash("sha256");
  let i = 0;
  let found: { rowNo: number; raw: string }[] = [];
  const flush = async () => {
    if (!found.length) return;
    await client.query(`UPDATE stg SET raw = x.raw FROM unnest($1::int[], $2::text[]) AS x(row_no, raw) WHERE stg.row_no = x.row_no`, [
      found.map((f) => f.rowNo),
      found.map((f) => f.raw),
    ]);
    found = [];
  };
  let first = true;
  for await (const batch of readCsv(filePath, profile, hash, undefined, (h) => freeTextColumns(profile, h))) {
    for (const rec of batch) {
      if (first) {
        first = false; // the header
        continue;
      }
      if (wanted.length === 0) continue;
      while (i < wanted.length - 1 && wanted[i] < rec.line) i++;
      if (rec.line === wanted[i]) {
        found.push({ rowNo: rec.line, raw: JSON.stringify(rec.fields) });
        if (++i === wanted.length) {
          await flush();
          wanted = await next(wanted[wanted.length - 1]);
          i = 0;
        }
      }
    }
  }
  await flush();
  if (hash.digest("hex") !== sha) throw new Error(`${path.basename(filePath)} changed while it was being loaded; load it again`);
}

/** The first accepted rows (the kind's staged columns, in the warehouse's units and codes) and the first rejects. */
async function previewOf(client: pg.PoolClient, kind: ExportKind, n: number): Promise<LoadPreview> {
  const cols = stageColumns[kind].map(([c]) => c);
  const rows = await client.query<{ line: number } & Record<string, unknown>>(
    `SELECT row_no AS line, ${cols.join(", ")} FROM stg WHERE reject_code IS NULL ORDER BY row_no LIMIT $1`,
    [n],
  );
  const rejects = await client.query<{ line: number; code: string; reason: string; raw: string | null }>(
    `SELECT row_no AS line, reject_code AS code, reject_reason AS reason, raw FROM stg WHERE reject_code IS NOT NULL ORDER BY row_no LIMIT $1`,
    [n],
  );
  const shopSql =
    kind === "machines"
      ? `SELECT home_shop AS code, count(*)::int AS rows FROM stg WHERE reject_code IS NULL GROUP BY 1 ORDER BY 1`
      : kind === "hours"
        ? `SELECT sh.shop_code AS code, count(*)::int AS rows FROM stg s JOIN dim_machine m ON m.serial = s.serial
             JOIN dim_shop sh ON sh.shop_key = m.home_shop_key WHERE s.reject_code IS NULL GROUP BY 1 ORDER BY 1`
        : `SELECT shop_code AS code, count(*)::int AS rows FROM stg WHERE reject_code IS NULL GROUP BY 1 ORDER BY 1`;
  const shops = (await client.query<{ code: string; rows: number }>(shopSql)).rows;
  return { shops, rows: rows.rows, rejects: rejects.rows.map((r) => ({ ...r, raw: r.raw ? (JSON.parse(r.raw) as string[]) : [] })) };
}

/** Loads one file; see the top of this module for the contract. */
export async function loadFile(target: pg.Pool | string, opts: LoadFileOptions): Promise<BatchSummary> {
  const started = Date.now();
  if (opts.profileDraft && !opts.dryRun) throw new Error("an unsaved profile can only be tried in a dry run; save it first");
  checkReadable(opts.path);
  const stored = await profilesAt(target);
  const draft = opts.profileDraft ? profileSchema.parse(opts.profileDraft) : null;
  const candidates: VersionedProfile[] = draft ? [...stored.filter((v) => v.profile.id !== draft.id), { profile: draft, version: null }] : stored;
  const { profile, report, readAs, encodingNote } = resolveProfile(opts.path, opts, candidates.map((v) => v.profile));
  const profileVersion = candidates.find((v) => v.profile === profile)?.version ?? null;
  const kind = profile.kind;
  const shop = opts.shop === undefined ? profile.defaultShop : normaliseCode(opts.shop);
  const headerNotes = { ignored: report.ignored.map((c) => ({ ...c, column: visibleText(c.column) })), absent: report.absent, encoding: encodingNote };
  opts.onHeader?.(headerNotes, profile);
  const totalBytes = checkReadable(opts.path);
  const today = opts.today ?? utcToday();
  const fileName = opts.fileName ?? path.basename(opts.path);
  let sha: string;
  try {
    sha = await fileSha256(opts.path);
  } catch (e) {
    throw new EtlFatalError("FILE_UNREADABLE", `cannot read ${opts.path}: ${(e as Error).message}`);
  }
  const pool = typeof target === "string" ? new pg.Pool(etlPoolConfig(target, 2)) : target;
  if (typeof target === "string") pool.on("error", () => {}); // an idle client closed by the server is simply dropped
  const client = await pool.connect();
  // the staging table's own connection (see StageTable), taken from the same pool once the batch is recorded
  let copyClient: pg.PoolClient | null = null;
  const ignoreCopyError = () => {}; // a dropped connection surfaces as the failing COPY
  let failed = false;
  let stage: StageTable | null = null;
  const startedAt = new Date();
  try {
    await client.query("BEGIN");
    // bulk merges sort and hash the whole file; give them room (transaction-local)
    await client.query("SET LOCAL work_mem = '256MB'");
    // the merges are few, large statements: compiling them costs more than it saves
    await client.query("SET LOCAL jit = off");
    // rows of these kinds must name a registered shop; an export never adds one
    let knownShops: Set<string> | null = null;
    if (kind === "jobs" || kind === "measurements" || kind === "weather") {
      knownShops = new Set((await client.query<{ shop_code: string }>(`SELECT shop_code FROM dim_shop`)).rows.map((r) => r.shop_code));
      if (shop && !knownShops.has(shop)) {
        throw new EtlFatalError("UNKNOWN_SHOP", `shop "${shop}" is not in the shop register; register it first (npm run etl -- shops register <file>)`);
      }
    }
    // the same bytes read by the same version of the same profile cannot change anything; after a profile
    // edit they can (a date format put right), so they are read again
    const before = profileVersion === null ? { rows: [] } : await client.query<{ rows_read: number }>(
      `SELECT rows_read FROM etl_batch WHERE sha256 = $1 AND profile = $2 AND profile_version = $3 AND status = 'loaded' ORDER BY batch_id LIMIT 1`,
      [sha, profile.id, profileVersion],
    );
    if (before.rows.length > 0) {
      // the same bytes were loaded before: nothing can change, every row is unchanged
      const read = Number(before.rows[0].rows_read);
      if (opts.dryRun) {
        await client.query("ROLLBACK");
        return {
          batchId: 0, file: fileName, sha256: sha, kind, profile: profile.id, profileVersion, shop: shop ?? null, status: "already_loaded", read,
          inserted: 0, updated: 0, unchanged: read, rejected: 0, durationMs: Date.now() - started, header: headerNotes, mergedLines: [],
          preview: { shops: [], rows: [], rejects: [] },
        };
      }
      const ins = await client.query<{ batch_id: number }>(
        `INSERT INTO etl_batch (file_name, sha256, profile, profile_version, kind, shop_code, loaded_by, started_at, finished_at, status,
           rows_read, rows_inserted, rows_updated, rows_unchanged, rows_rejected, source)
         VALUES ($1, $2, $3, $9, $4, $5, $6, $7, now(), 'already_loaded', $8, 0, 0, $8, 0, $10) RETURNING batch_id`,
        [fileName, sha, profile.id, kind, shop ?? null, opts.loadedBy, startedAt, read, profileVersion, opts.source ?? "export"],
      );
      await client.query("COMMIT");
      opts.onProgress?.({ phase: "done", rowsRead: read, bytesRead: totalBytes, totalBytes });
      return {
        batchId: Number(ins.rows[0].batch_id), file: fileName, sha256: sha, kind, profile: profile.id, profileVersion, shop: shop ?? null,
        status: "already_loaded", read, inserted: 0, updated: 0, unchanged: read, rejected: 0, durationMs: Date.now() - started,
        header: headerNotes, mergedLines: [],
      };
    }
    const ins = await client.query<{ batch_id: number }>(
      `INSERT INTO etl_batch (file_name, sha256, profile, profile_version, kind, shop_code, loaded_by, started_at, status, source)
       VALUES ($1, $2, $3, $8, $4, $5, $6, $7, 'running', $9) RETURNING batch_id`,
      [fileName, sha, profile.id, kind, shop ?? null, opts.loadedBy, startedAt, profileVersion, opts.source ?? "export"],
    );
    const batchId = Number(ins.rows[0].batch_id);
    await seedReference(client);
    copyClient = await pool.connect();
    copyClient.on("error", ignoreCopyError);
    stage = await StageTable.create(client, copyClient, kind, batchId);
    const merge = merges[kind];
    await merge.prepare?.(client);
    const blocks: BlockTally = { inserted: 0, updated: 0 };
    let stager: RowStager | null = null;
    const pipe = new StagePipeline(
      stage,
      kind,
      opts.blockRows ?? DEFAULT_BLOCK_ROWS,
      async (first, last, repeats) => {
        if (!merge.block) return;
        const t = await merge.block(client, batchId, first, last, repeats as boolean, stager!.kept);
        blocks.inserted += t.inserted;
        blocks.updated += t.updated;
      },
      () => stager?.blockHadRepeats() ?? false,
    );
    const streamHash = createHash("sha256");
    let bytesRead = 0;
    let rowsRead = 0;
    let header: string[] | null = null;
    try {
      for await (const batch of readCsv(opts.path, readAs, streamHash, (b) => (bytesRead = b), (h) => freeTextColumns(profile, h))) {
        for (const rec of batch) {
          if (stager === null) {
            header = rec.fields;
            stager = new RowStager(kind, readAs, header, shop, today, knownShops);
            continue;
          }
          rowsRead++;
          const wait = pipe.write(rec.line, stager.line(rec));
          if (wait) await wait;
          if (opts.signal?.aborted) throw new EtlFatalError("CANCELLED", `the load of ${fileName} was cancelled; nothing of it was kept`);
          if (rowsRead % 5000 === 0) opts.onProgress?.({ phase: "reading", rowsRead, bytesRead, totalBytes });
        }
      }
    } catch (e) {
      // blocks already handed to the database must finish before the client can report the reading error
      await pipe.settle();
      throw e;
    }
    await pipe.end();
    if (process.env.ETL_TIMINGS) process.stderr.write(`${Date.now() - started} ms  since the start: every row staged, every block merged\n`);
    if (header === null) throw new EtlFatalError("HEADER_NOT_RECOGNISED", `${fileName} has no header line`);
    if (streamHash.digest("hex") !== sha) throw new Error(`${fileName} changed while it was being loaded; load it again`);
    // temp tables are never auto-analysed; without statistics the whole-file checks get nested-loop plans.
    // A small sample is plenty for their joins and costs a fraction of the default one.
    await client.query("SET LOCAL default_statistics_target = 10");
    await client.query(`ANALYZE ${stage.name}`);
    opts.onProgress?.({ phase: "merging", rowsRead, bytesRead, totalBytes });
    await opts.hooks?.afterStaging?.(client);

    await ensureDates(client, stager!.minDate, stager!.maxDate);
    const merged = await merge.finish(client, batchId, blocks, {
      mayRepeatKeys: stager!.fileHadRepeats, members: stager!.members, meterChanges: stager!.meterChanges, kept: stager!.kept,
    });
    const rej = await client.query<{ n: number; without_raw: number }>(
      `SELECT count(*)::int AS n, count(*) FILTER (WHERE raw IS NULL)::int AS without_raw FROM stg WHERE reject_code IS NOT NULL`,
    );
    if (rej.rows[0].without_raw > 0) await recoverRawRows(client, opts.path, readAs, sha);
    if (rej.rows[0].n > 0) await storeRejects(client, batchId, header!.map(visibleText));
    const counts = { ...merged, rejected: rej.rows[0].n };
    await client.query(
      `UPDATE etl_batch SET finished_at = now(), rows_read = $2, rows_inserted = $3, rows_updated = $4, rows_unchanged = $5,
         rows_rejected = $6, status = 'loaded', notes = $7
       WHERE batch_id = $1`,
      [batchId, rowsRead, counts.inserted, counts.updated, counts.unchanged, counts.rejected, JSON.stringify({ ...headerNotes, mergedLines: stager!.mergedSpans, columns: header!.map(visibleText) })],
    );
    if (opts.signal?.aborted) throw new EtlFatalError("CANCELLED", `the load of ${fileName} was cancelled; nothing of it was kept`);
    if (opts.dryRun) {
      const preview = await previewOf(client, kind, opts.previewRows ?? 20);
      await client.query("ROLLBACK");
      return {
        batchId: 0, file: fileName, sha256: sha, kind, profile: profile.id, profileVersion, shop: shop ?? null, status: "dry_run", read: rowsRead, ...counts,
        durationMs: Date.now() - started, header: headerNotes, mergedLines: stager!.mergedSpans, preview,
      };
    }
    await opts.hooks?.beforeCommit?.(client);
    await client.query("COMMIT");
    opts.onProgress?.({ phase: "done", rowsRead, bytesRead, totalBytes });
    return {
      batchId,
      file: fileName,
      sha256: sha,
      kind,
      profile: profile.id,
      profileVersion,
      shop: shop ?? null,
      status: "loaded",
      read: rowsRead,
      ...counts,
      durationMs: Date.now() - started,
      header: headerNotes,
      mergedLines: stager!.mergedSpans,
    };
  } catch (e) {
    failed = true;
    await client.query("ROLLBACK").catch(() => undefined);
    if (!(e instanceof EtlFatalError)) {
      await client
        .query(
          `INSERT INTO etl_batch (file_name, sha256, profile, profile_version, kind, shop_code, loaded_by, started_at, finished_at, status, error_message, source)
           VALUES ($1, $2, $3, $9, $4, $5, $6, $7, now(), 'failed', $8, $10)`,
          [fileName, sha, profile.id, kind, shop ?? null, opts.loadedBy, startedAt, (e as Error).message, profileVersion, opts.source ?? "export"],
        )
        .catch(() => undefined);
    }
    throw e;
  } finally {
    await stage?.drop(client);
    copyClient?.off("error", ignoreCopyError);
    copyClient?.release(failed); // a failed load's COPY connection may be mid-stream: discard it
    client.release();
    if (typeof target === "string") await pool.end();
  }
}
