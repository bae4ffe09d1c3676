import { stringify } from "csv-stringify/sync";
import { rejectedLineKey } from "../../../etl/index.js";
import type { Db } from "../../db/database.js";
import { profileOfBatch } from "../../db/queries/profiles.js";
import { getBatch, laterBatchesOf, listBatches, rejectReasons, rejectRows, type BatchRow } from "../../db/queries/imports.js";
import { HttpError } from "../../errors.js";
import { csvCell } from "../../../shared/csv-cell.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { Batch, RejectPage } from "../../../shared/schemas/imports.js";
import { warmStateOf } from "../answer-warmer.js";
import { dashboardsFor } from "../dashboards-current.js";

function present(b: BatchRow, db: Db): Batch {
  return {
    id: b.batch_id,
    fileName: b.file_name,
    kind: b.kind as Batch["kind"],
    profile: b.profile,
    profileVersion: b.profile_version,
    shop: b.shop_code,
    loadedBy: b.loaded_by,
    startedAt: b.started_at.toISOString(),
    durationMs: b.duration_ms,
    status: b.status as Batch["status"],
    read: b.rows_read,
    inserted: b.rows_inserted,
    updated: b.rows_updated,
    unchanged: b.rows_unchanged,
    rejected: b.rows_rejected,
    importId: b.upload_id,
    dashboards: dashboardsFor({ id: b.batch_id, status: b.status, inserted: b.rows_inserted, updated: b.rows_updated }, warmStateOf(db)),
  };
}

export async function batchHistory(db: Db, scope: ShopScope, user: string, o: { shop?: string; limit: number }): Promise<Batch[]> {
  return (await listBatches(db, scope, user, o)).map((b) => present(b, db));
}

async function visibleBatch(db: Db, scope: ShopScope, user: string, id: string): Promise<BatchRow> {
  const b = await getBatch(db, scope, user, id);
  if (!b) throw new HttpError(404, "not_found", "No such load.");
  return b;
}

/** The file's header: from the batch's notes, else the keys of its first reject. */
function columnsOf(b: BatchRow, rows: { raw: Record<string, string> }[]): string[] {
  return b.notes?.columns ?? Object.keys(rows[0]?.raw ?? {});
}

/** One page of a batch's rejects, with the reasons and, per row, the later batch that loaded its line after all. */
export async function batchRejects(db: Db, scope: ShopScope, user: string, id: string, q: { reason?: string; offset: number; limit: number }): Promise<RejectPage> {
  const b = await visibleBatch(db, scope, user, id);
  const [reasons, rows] = await Promise.all([rejectReasons(db, id), rejectRows(db, id, q)]);
  const profile = await profileOfBatch(db, b.profile, b.profile_version);
  const keys = rows.map((r) => rejectedLineKey(profile, r.raw, b.shop_code));
  const later = await laterBatchesOf(db, id, keys.filter((k): k is string => k !== null));
  const total = q.reason ? (reasons.find((r) => r.code === q.reason)?.count ?? 0) : reasons.reduce((n, r) => n + r.count, 0);
  return {
    batch: present(b, db),
    total,
    reasons,
    columns: columnsOf(b, rows),
    rows: rows.map((r, i) => ({ ...r, fixedBy: keys[i] ? (later.get(keys[i]!) ?? null) : null })),
  };
}

/** A batch's rejects as CSV: line, reason code, reason, then the raw fields under the file's own header. */
export async function batchRejectsCsv(db: Db, scope: ShopScope, user: string, id: string, reason?: string): Promise<{ name: string; csv: string }> {
  const b = await visibleBatch(db, scope, user, id);
  const rows = await rejectRows(db, id, { reason, offset: 0, limit: 1_000_000 });
  const columns = columnsOf(b, rows);
  const body = [
    ["line", "reason_code", "reason", ...columns],
    ...rows.map((r) => [String(r.line), r.code, r.reason, ...columns.map((c) => r.raw[c] ?? "")]),
  ].map((cells) => cells.map(csvCell));
  return { name: `rejects-batch-${b.batch_id}${reason ? `-${reason}` : ""}.csv`, csv: stringify(body) };
}
