import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { open, rename, unlink } from "node:fs/promises";
import path from "node:path";
import { HttpError } from "../../errors.js";
import type { Db } from "../../db/database.js";
import { getUpload, insertUpload, listUploads, updateUpload, type UploadRow } from "../../db/queries/imports.js";
import { scopedShopCodes } from "../../db/queries/scope.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { Import, ImportChoices } from "../../../shared/schemas/imports.js";
import { CHECK_QUEUE, enqueue, LOAD_QUEUE, type ImportDeps } from "./import-jobs.js";

/** What an upload route hands over for each file multer spooled to disk. */
export interface SpooledFile {
  originalname: string;
  path: string;
  size: number;
}

/** Bytes no CSV text holds in its first kilobytes; a file that starts like this is not an export. */
function looksBinary(head: Buffer): boolean {
  let odd = 0;
  for (const b of head) if (b === 0 || (b < 0x09) || (b > 0x0d && b < 0x20 && b !== 0x1b)) odd++;
  return head.length > 0 && odd > head.length / 20;
}

async function sniffHead(file: string): Promise<Buffer> {
  const fh = await open(file, "r");
  try {
    const buf = Buffer.alloc(4096);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

async function sha256Of(file: string): Promise<string> {
  const h = createHash("sha256");
  for await (const chunk of createReadStream(file, { highWaterMark: 1 << 20 })) h.update(chunk as Buffer);
  return h.digest("hex");
}

/** The upload as the client sees it. */
export function present(u: UploadRow): Import {
  return {
    id: u.upload_id,
    fileName: u.file_name,
    sizeBytes: Number(u.size_bytes),
    sha256: u.sha256,
    uploadedBy: u.uploaded_by,
    uploadedAt: u.uploaded_at.toISOString(),
    kind: (u.kind as Import["kind"]) ?? null,
    profile: u.profile,
    shop: u.shop_code,
    status: u.status as Import["status"],
    message: u.message,
    preview: (u.preview as Import["preview"]) ?? null,
    progress: (u.progress as Import["progress"]) ?? null,
    batchId: u.batch_id,
  };
}

/**
 * Takes the spooled files of one request: each is sniffed (text, not binary, whatever its name says),
 * hashed, archived in object storage under its sha256 and recorded; its check starts as a job. A file that
 * is not text is recorded as refused with the reason, so the user sees it beside the others.
 */
export async function receiveUploads(deps: ImportDeps, files: SpooledFile[], user: { name: string; sub: string }, scope: ShopScope): Promise<Import[]> {
  const out: Import[] = [];
  for (const f of files) {
    const sha = await sha256Of(f.path);
    const spoolPath = path.join(deps.spoolDir, `${sha}.csv`);
    await rename(f.path, spoolPath).catch(async () => {
      // another upload of the same bytes is spooled already: keep that copy
      await unlink(f.path).catch(() => undefined);
    });
    const binary = looksBinary(await sniffHead(spoolPath));
    const objectKey = deps.storage && !binary ? `imports/${sha}` : null;
    if (objectKey) await deps.storage!.putFile(objectKey, spoolPath, f.size, "text/csv");
    const row = await insertUpload(deps.db, {
      fileName: f.originalname.slice(0, 255) || "upload.csv",
      sizeBytes: f.size,
      sha256: sha,
      objectKey,
      spoolPath,
      uploadedBy: user.name,
      uploadedBySub: user.sub,
      scopeShops: scopedShopCodes(scope),
    });
    if (binary) {
      await updateUpload(deps.db, row.upload_id, {
        status: "refused",
        message: "This file is not CSV text (it holds binary data, e.g. a spreadsheet workbook or an archive); export the data as CSV and upload that.",
      });
    } else {
      await enqueue(deps, CHECK_QUEUE, row.upload_id);
    }
    out.push(present((await getUpload(deps.db, row.upload_id))!));
  }
  return out;
}

/** An upload the caller (`userSub`) may act on: their own, or any for a group-wide role; 404 otherwise (the same answer as a missing one). */
export async function uploadFor(db: Db, id: string, userSub: string, scope: ShopScope): Promise<UploadRow> {
  const u = /^\d{1,18}$/.test(id) ? await getUpload(db, id) : null;
  if (!u || (scopedShopCodes(scope) !== null && u.uploaded_by_sub !== userSub)) throw new HttpError(404, "not_found", "No such upload.");
  return u;
}

export async function recentUploads(db: Db, user: string, scope: ShopScope): Promise<Import[]> {
  return (await listUploads(db, scope, user)).map(present);
}

/** Check again with other choices (kind, profile, shop; null = detect). */
export async function recheck(deps: ImportDeps, u: UploadRow, c: ImportChoices): Promise<Import> {
  if (!["ready", "refused", "failed", "cancelled"].includes(u.status)) {
    throw new HttpError(409, "busy", "This upload is being checked or loaded; wait until it is done.");
  }
  await updateUpload(deps.db, u.upload_id, {
    kind: c.kind ?? null, profile: c.profile?.trim() || null, shop_code: c.shop?.trim().toUpperCase() || null,
    status: "checking", message: null, preview: null, progress: null, cancel_requested: false,
  });
  await enqueue(deps, CHECK_QUEUE, u.upload_id);
  return present((await getUpload(deps.db, u.upload_id))!);
}

export async function startLoad(deps: ImportDeps, u: UploadRow): Promise<Import> {
  const ok = await updateUpload(deps.db, u.upload_id, { status: "queued", message: null, progress: null, cancel_requested: false }, ["ready"]);
  if (!ok) {
    const why = u.status === "refused" ? `This file cannot be loaded: ${u.message ?? "see the check"}` : "Only a checked upload that is ready can be loaded.";
    throw new HttpError(409, "not_ready", why);
  }
  await enqueue(deps, LOAD_QUEUE, u.upload_id);
  return present((await getUpload(deps.db, u.upload_id))!);
}

export async function cancelLoad(db: Db, u: UploadRow): Promise<Import> {
  if (!["queued", "loading"].includes(u.status)) throw new HttpError(409, "not_loading", "Only a load that is waiting or running can be cancelled.");
  await updateUpload(db, u.upload_id, { cancel_requested: true });
  // a load still waiting stops here; a running one stops at its next progress report
  await updateUpload(db, u.upload_id, { status: "cancelled", message: "The load was cancelled before it started; nothing was loaded." }, ["queued"]);
  return present((await getUpload(db, u.upload_id))!);
}
