import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { scopedShopCodes } from "./scope.js";

/** SQL of the uploads, the load history and the rejects. Every read takes the caller's scope. */

export interface UploadRow {
  upload_id: string;
  file_name: string;
  size_bytes: string;
  sha256: string;
  object_key: string | null;
  spool_path: string;
  uploaded_by: string;
  uploaded_by_sub: string;
  uploaded_at: Date;
  scope_shops: string[] | null;
  kind: string | null;
  profile: string | null;
  shop_code: string | null;
  status: string;
  message: string | null;
  preview: unknown;
  progress: unknown;
  batch_id: string | null;
  cancel_requested: boolean;
}

export async function insertUpload(
  db: Db,
  u: { fileName: string; sizeBytes: number; sha256: string; objectKey: string | null; spoolPath: string; uploadedBy: string; uploadedBySub: string; scopeShops: string[] | null },
): Promise<UploadRow> {
  const r = await sql<UploadRow>`
    INSERT INTO etl_upload (file_name, size_bytes, sha256, object_key, spool_path, uploaded_by, uploaded_by_sub, scope_shops)
    VALUES (${u.fileName}, ${u.sizeBytes}, ${u.sha256}, ${u.objectKey}, ${u.spoolPath}, ${u.uploadedBy}, ${u.uploadedBySub}, ${u.scopeShops})
    RETURNING *, upload_id::text AS upload_id, batch_id::text AS batch_id, size_bytes::text AS size_bytes`.execute(db);
  return r.rows[0];
}

export async function getUpload(db: Db, id: string): Promise<UploadRow | null> {
  const r = await sql<UploadRow>`
    SELECT *, upload_id::text AS upload_id, batch_id::text AS batch_id, size_bytes::text AS size_bytes
    FROM etl_upload WHERE upload_id = ${id}::bigint`.execute(db);
  return r.rows[0] ?? null;
}

/** Recent uploads: a group-wide role sees all, anyone else the uploads they made (`userSub`). */
export async function listUploads(db: Db, scope: ShopScope, userSub: string, limit = 50): Promise<UploadRow[]> {
  const mine = scopedShopCodes(scope) !== null;
  const r = await sql<UploadRow>`
    SELECT *, upload_id::text AS upload_id, batch_id::text AS batch_id, size_bytes::text AS size_bytes
    FROM etl_upload WHERE ${mine ? sql`uploaded_by_sub = ${userSub}` : sql`true`}
    ORDER BY etl_upload.uploaded_at DESC, etl_upload.upload_id DESC LIMIT ${limit}`.execute(db);
  return r.rows;
}

type UploadPatch = Partial<{
  kind: string | null; profile: string | null; shop_code: string | null; status: string; message: string | null;
  preview: unknown; progress: unknown; batch_id: string | null; cancel_requested: boolean;
}>;

/** Updates an upload; with `onlyIf`, only while its status is one of those (returns whether it did). */
export async function updateUpload(db: Db, id: string, patch: UploadPatch, onlyIf?: string[]): Promise<boolean> {
  const sets = Object.entries(patch).map(([k, v]) =>
    k === "preview" || k === "progress" ? sql`${sql.ref(k)} = ${v === null ? null : JSON.stringify(v)}::jsonb` : sql`${sql.ref(k)} = ${v}`,
  );
  const r = await sql`
    UPDATE etl_upload SET ${sql.join([...sets, sql`updated_at = now()`])}
    WHERE upload_id = ${id}::bigint ${onlyIf ? sql`AND status = ANY(${onlyIf})` : sql``}`.execute(db);
  return Number(r.numAffectedRows ?? 0) > 0;
}

export interface BatchRow {
  batch_id: string;
  file_name: string;
  kind: string;
  profile: string;
  profile_version: number | null;
  shop_code: string | null;
  loaded_by: string;
  started_at: Date;
  duration_ms: number | null;
  status: string;
  rows_read: number;
  rows_inserted: number;
  rows_updated: number;
  rows_unchanged: number;
  rows_rejected: number;
  upload_id: string | null;
  notes: { columns?: string[] } | null;
}

const BATCH_SELECT = sql`
  SELECT b.batch_id::text AS batch_id, b.file_name, b.kind, b.profile, b.profile_version, b.shop_code, b.loaded_by, b.started_at,
    (extract(epoch FROM b.finished_at - b.started_at) * 1000)::int AS duration_ms, b.status, b.rows_read, b.rows_inserted,
    b.rows_updated, b.rows_unchanged, b.rows_rejected, u.upload_id::text AS upload_id, b.notes
  FROM etl_batch b LEFT JOIN etl_upload u ON u.batch_id = b.batch_id`;

/** A manager sees the batches of their shops and the ones they loaded themselves (`userSub`); the others see all. */
function batchVisible(scope: ShopScope, userSub: string) {
  const shops = scopedShopCodes(scope);
  return shops === null ? sql`true` : sql`(b.shop_code = ANY(${shops}) OR u.uploaded_by_sub = ${userSub})`;
}

export async function listBatches(db: Db, scope: ShopScope, user: string, o: { shop?: string; limit: number }): Promise<BatchRow[]> {
  const r = await sql<BatchRow>`
    ${BATCH_SELECT}
    WHERE ${batchVisible(scope, user)} ${o.shop ? sql`AND b.shop_code = ${o.shop}` : sql``}
    ORDER BY b.batch_id DESC LIMIT ${o.limit}`.execute(db);
  return r.rows;
}

export async function getBatch(db: Db, scope: ShopScope, user: string, id: string): Promise<BatchRow | null> {
  const r = await sql<BatchRow>`${BATCH_SELECT} WHERE b.batch_id = ${id}::bigint AND ${batchVisible(scope, user)}`.execute(db);
  return r.rows[0] ?? null;
}

export async function rejectReasons(db: Db, batchId: string): Promise<{ code: string; count: number }[]> {
  const r = await sql<{ code: string; count: number }>`
    SELECT reason_code AS code, count(*)::int AS count FROM etl_reject WHERE batch_id = ${batchId}::bigint GROUP BY 1 ORDER BY 2 DESC, 1`.execute(db);
  return r.rows;
}

export async function rejectRows(
  db: Db,
  batchId: string,
  o: { reason?: string; offset: number; limit: number },
): Promise<{ line: number; code: string; reason: string; raw: Record<string, string> }[]> {
  const r = await sql<{ line: number; code: string; reason: string; raw: Record<string, string> }>`
    SELECT row_number AS line, reason_code AS code, reason, raw_row AS raw FROM etl_reject
    WHERE batch_id = ${batchId}::bigint ${o.reason ? sql`AND reason_code = ${o.reason}` : sql``}
    ORDER BY row_number OFFSET ${o.offset} LIMIT ${o.limit}`.execute(db);
  return r.rows;
}

/** For natural keys of rejected lines: the later batch that stored each line, when one did. */
export async function laterBatchesOf(db: Db, batchId: string, keyTexts: string[]): Promise<Map<string, string>> {
  if (keyTexts.length === 0) return new Map();
  const r = await sql<{ k: string; batch_id: string }>`
    SELECT t.k, f.batch_id::text AS batch_id FROM unnest(${keyTexts}::text[]) AS t(k)
    JOIN fact_repair_line f ON f.repair_line_key = wh_key(t.k)
    WHERE f.batch_id > ${batchId}::bigint`.execute(db);
  return new Map(r.rows.map((x) => [x.k, x.batch_id]));
}
