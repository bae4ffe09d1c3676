import { existsSync } from "node:fs";
import { mkdir } from "node:fs/promises";
import { createWriteStream } from "node:fs";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import type pg from "pg";
import type PgBoss from "pg-boss";
import { EtlFatalError, loadFile, refreshExposure, type BatchSummary, type LoadProgress } from "../../../etl/index.js";
import type { Db } from "../../db/database.js";
import { getUpload, updateUpload, type UploadRow } from "../../db/queries/imports.js";
import { logger } from "../../logger.js";
import type { Storage } from "../storage.js";
import type { ImportPreview, ImportProgress } from "../../../shared/schemas/imports.js";
import { runOnWorker } from "../worker-pool.js";
import type { EtlTask } from "./etl-task.js";

/**
 * The two jobs an upload goes through, on pg-boss queues (or in-process when the app runs without a queue,
 * as the API tests do): CHECK, a dry run of the whole file through the ETL (nothing stored) that becomes the
 * preview, and LOAD, the load itself with live progress, cancellable, followed by the incremental refresh of
 * the derived tables so the dashboards show it. A load interrupted by a server stop leaves nothing (one
 * transaction); pg-boss runs the job again when its lease expires, and it starts from the file again.
 */
export const CHECK_QUEUE = "import-check";
export const LOAD_QUEUE = "import-load";

export interface ImportDeps {
  db: Db;
  pool: pg.Pool;
  storage?: Storage;
  boss?: PgBoss | null;
  /** where uploads are spooled on this server's disk */
  spoolDir: string;
  /** with it, the jobs run on a worker thread with a pool of their own (see etl-task.ts); without, on this thread */
  databaseUrl?: string;
}

const taskFile = path.join(import.meta.dirname, "etl-task.ts");

/** Runs a job: the file is made local here (object storage is this thread's), the work on a worker when it can. */
async function dispatch(deps: ImportDeps, job: "check" | "load", uploadId: string): Promise<void> {
  const u = await getUpload(deps.db, uploadId);
  if (!u) return;
  try {
    await localCopy(deps, u);
  } catch (err) {
    // the cause goes to the log; the page says what happened and what to do
    logger.error({ err, uploadId }, "import file could not be read from storage");
    const words = "The uploaded file could not be read back from storage. Nothing was loaded; upload it again, and if it fails again tell your administrator.";
    if (job === "check") await updateUpload(deps.db, uploadId, { status: "failed", message: words }, ["checking"]);
    else await updateUpload(deps.db, uploadId, { status: "failed", message: words }, ["queued", "loading"]);
    return;
  }
  if (deps.databaseUrl) {
    const task: EtlTask = { job, uploadId, databaseUrl: deps.databaseUrl, spoolDir: deps.spoolDir };
    await runOnWorker<void>(taskFile, task);
  } else {
    await (job === "check" ? runCheck(deps, uploadId) : runLoad(deps, uploadId));
  }
}

const PROGRESS_EVERY_MS = 1000;

/** Puts a job on its queue; without a queue, runs it on this process after the answer has gone. */
export async function enqueue(deps: ImportDeps, queue: typeof CHECK_QUEUE | typeof LOAD_QUEUE, uploadId: string): Promise<void> {
  if (deps.boss) {
    await deps.boss.send(queue, { uploadId }, { retryLimit: 2, retryDelay: 5, expireInSeconds: 3600 });
    return;
  }
  setImmediate(() => {
    void dispatch(deps, queue === CHECK_QUEUE ? "check" : "load", uploadId).catch((err: unknown) =>
      logger.error({ err, uploadId }, "import job failed"),
    );
  });
}

/** Starts the workers (one job of each queue at a time: a load takes two database connections and a core). */
export async function startImportWorkers(deps: ImportDeps & { boss: PgBoss }): Promise<void> {
  for (const q of [CHECK_QUEUE, LOAD_QUEUE]) await deps.boss.createQueue(q);
  await deps.boss.work<{ uploadId: string }>(CHECK_QUEUE, { pollingIntervalSeconds: 1 }, async ([job]) => dispatch(deps, "check", job.data.uploadId));
  await deps.boss.work<{ uploadId: string }>(LOAD_QUEUE, { pollingIntervalSeconds: 1 }, async ([job]) => dispatch(deps, "load", job.data.uploadId));
}

/** The upload's bytes on this server's disk: the spooled copy, or fetched back from object storage. */
async function localCopy(deps: ImportDeps, u: UploadRow): Promise<string> {
  if (existsSync(u.spool_path)) return u.spool_path;
  if (!u.object_key || !deps.storage) throw new Error("the uploaded file is no longer on this server and was not archived; upload it again");
  await mkdir(path.dirname(u.spool_path), { recursive: true });
  const obj = await deps.storage.getObject(u.object_key, ", so the uploaded file cannot be read back");
  await pipeline(obj.body, createWriteStream(u.spool_path));
  return u.spool_path;
}

const choices = (u: UploadRow) => ({
  kind: (u.kind ?? undefined) as BatchSummary["kind"] | undefined,
  profile: u.profile ?? undefined,
  shop: u.shop_code ?? undefined,
});

// the words are stored once, before anyone reads them, so no reader's locale is known: commas, like the rest of the server's words
const COUNT = new Intl.NumberFormat("en-US");

/** Shops the file names that lie outside the uploader's shops, in words; null when there are none. */
function outsideScope(u: UploadRow, shops: { code: string; rows: number }[]): string | null {
  if (!u.scope_shops) return null;
  const others = shops.filter((s) => !u.scope_shops!.includes(s.code));
  if (others.length === 0) return null;
  const list = others.map((s) => `${s.code} (${COUNT.format(s.rows)} ${s.rows === 1 ? "row" : "rows"})`).join(", ");
  return `This file has rows of shop ${list}; you can load files of your own shops only (${u.scope_shops.join(", ") || "none"}). Nothing was loaded.`;
}

/** CHECK: a dry run over the whole file; the preview, or the reason it cannot be loaded. */
export async function runCheck(deps: ImportDeps, uploadId: string): Promise<void> {
  const u = await getUpload(deps.db, uploadId);
  if (!u || u.status !== "checking") return;
  try {
    const file = await localCopy(deps, u);
    const s = await loadFile(deps.pool, { path: file, ...choices(u), fileName: u.file_name, loadedBy: u.uploaded_by, dryRun: true, previewRows: 20 });
    const preview = previewOf(s);
    const p = s.preview!;
    const refused = outsideScope(u, p.shops);
    // a file of one shop is recorded under it (its batch then shows in that shop's history)
    const shop = u.shop_code ?? (p.shops.length === 1 ? p.shops[0].code : null);
    await updateUpload(
      deps.db, uploadId,
      { status: refused ? "refused" : "ready", message: refused, preview, kind: s.kind, profile: s.profile, shop_code: shop },
      ["checking"],
    );
  } catch (err) {
    const words = err instanceof EtlFatalError ? err.message : "The file could not be checked because of a problem on the server, not in the file. Nothing was loaded; try again in a few minutes, and if it fails again tell your administrator.";
    if (!(err instanceof EtlFatalError)) logger.error({ err, uploadId }, "import check failed");
    await updateUpload(deps.db, uploadId, { status: err instanceof EtlFatalError ? "refused" : "failed", message: words }, ["checking"]);
  }
}

/** A dry run's summary as the preview the pages show (rows in the warehouse's units and codes, the first rejects). */
export function previewOf(s: BatchSummary): ImportPreview {
  const p = s.preview ?? { shops: [], rows: [], rejects: [] };
  return {
    read: s.read, inserted: s.inserted, updated: s.updated, unchanged: s.unchanged, rejected: s.rejected,
    header: s.header, mergedLines: s.mergedLines, shops: p.shops,
    // stored as JSON, an object loses its key order: the columns keep it
    columns: p.rows.length ? Object.keys(p.rows[0]).filter((k) => k !== "line") : [],
    rows: p.rows.map(({ line, ...values }) => ({ line, values: Object.fromEntries(Object.entries(values).map(([k, v]) => [k, cell(v)])) })),
    rejects: p.rejects,
  };
}

/** A staged value as the preview shows it: dates as YYYY-MM-DD, numbers as numbers. */
function cell(v: unknown): string | number | boolean | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  if (typeof v === "number" || typeof v === "boolean") return v;
  const s = String(v);
  return /^-?\d+(\.\d+)?$/.test(s) && s.length < 16 ? Number(s) : s;
}

/** LOAD: the load with progress (and cancel) written to the upload, then the derived tables brought up to date. */
export async function runLoad(deps: ImportDeps, uploadId: string): Promise<void> {
  const u = await getUpload(deps.db, uploadId);
  if (!u || !["queued", "loading"].includes(u.status)) return;
  if (u.cancel_requested) {
    await updateUpload(deps.db, uploadId, { status: "cancelled", message: "The load was cancelled before it started; nothing was loaded." });
    return;
  }
  await updateUpload(deps.db, uploadId, { status: "loading", message: null, progress: null });
  const started = Date.now();
  const ctl = new AbortController();
  let last = 0;
  let writing: Promise<unknown> = Promise.resolve();
  const onProgress = (p: LoadProgress) => {
    const now = Date.now();
    if (p.phase === "reading" && now - last < PROGRESS_EVERY_MS) return;
    last = now;
    const progress = progressOf(p, started);
    writing = writing
      .then(() => updateUpload(deps.db, uploadId, { progress }))
      .then(() => getUpload(deps.db, uploadId))
      .then((x) => {
        if (x?.cancel_requested) ctl.abort();
      })
      .catch(() => undefined);
  };
  try {
    const file = await localCopy(deps, u);
    const s = await loadFile(deps.pool, { path: file, ...choices(u), fileName: u.file_name, loadedBy: u.uploaded_by, onProgress, signal: ctl.signal });
    await writing;
    await updateUpload(deps.db, uploadId, { progress: { ...progressOf({ phase: "merging", rowsRead: s.read, bytesRead: Number(u.size_bytes), totalBytes: Number(u.size_bytes) }, started), phase: "refreshing" } });
    if (s.inserted + s.updated > 0) await refreshExposure(deps.db);
    await updateUpload(deps.db, uploadId, {
      status: "loaded",
      batch_id: String(s.batchId),
      message: s.status === "already_loaded" ? "These exact bytes were loaded before; nothing changed." : null,
      progress: { ...progressOf({ phase: "done", rowsRead: s.read, bytesRead: Number(u.size_bytes), totalBytes: Number(u.size_bytes) }, started), percent: 100 },
    });
  } catch (err) {
    await writing;
    if (err instanceof EtlFatalError && err.code === "CANCELLED") {
      await updateUpload(deps.db, uploadId, { status: "cancelled", message: "The load was cancelled; nothing of the file was kept." });
      return;
    }
    const words = err instanceof EtlFatalError ? err.message : "The load stopped because of a problem on the server, not in the file, and nothing of the file was kept. Try again in a few minutes; if it fails again tell your administrator.";
    logger.error({ err, uploadId }, "import load failed");
    await updateUpload(deps.db, uploadId, { status: "failed", message: words });
  }
}

function progressOf(p: LoadProgress, started: number): ImportProgress {
  const seconds = Math.max((Date.now() - started) / 1000, 0.001);
  const fraction = p.totalBytes > 0 ? Math.min(1, p.bytesRead / p.totalBytes) : 0;
  const secondsLeft = fraction > 0.02 && fraction < 1 ? Math.round((seconds / fraction) * (1 - fraction)) : null;
  return {
    rowsRead: p.rowsRead,
    bytesRead: p.bytesRead,
    totalBytes: p.totalBytes,
    rowsPerSecond: Math.round(p.rowsRead / seconds),
    percent: Math.round(fraction * 1000) / 10,
    secondsLeft,
    phase: p.phase,
  };
}
