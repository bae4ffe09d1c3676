/**
 * Claim attachments: a received file is typed by its content, kept in object storage and recorded with the
 * claim; an attachment is read back as a stream from storage.
 */
import { randomUUID } from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import type { Db } from "../../db/database.js";
import { claimAttachments, insertAttachment, type Actor, type ClaimRow } from "../../db/queries/claims.js";
import { HttpError, notFound } from "../../errors.js";
import type { Storage, StoredObject } from "../storage.js";

export const MAX_ATTACHMENT_BYTES = 8 * 1024 * 1024;

const ACCEPTED_TYPES: Record<string, string> = {
  "image/png": "PNG image",
  "image/jpeg": "JPEG image",
  "image/webp": "WebP image",
  "image/gif": "GIF image",
  "application/pdf": "PDF document",
};

/** A received file: its bytes and the name the browser sent. */
export interface ReceivedFile {
  buffer: Buffer;
  size: number;
  originalname: string;
}

export interface AttachmentDeps {
  db: Db;
  storage?: Storage;
}

/** The upload form hands over the name as latin1; browsers send UTF-8. Keep the base name only, without control characters. */
// By hand rather than a file-name package: the name is only shown and stored, never used as a path.
function cleanName(name: string): string {
  const utf8 = Buffer.from(name, "latin1").toString("utf8");
  const base = utf8.split(/[\\/]/).pop() ?? "file";
  return base.replace(/[\u0000-\u001f\u007f"]/g, "").slice(0, 200) || "file";
}

function requireStorage(storage: Storage | undefined, consequence: string): Storage {
  if (!storage) throw new HttpError(503, "storage_unavailable", `Object storage is not configured on this server${consequence}.`);
  return storage;
}

/** Keeps a photo or PDF with the claim; anything else is refused in words and nothing is saved. */
export async function addAttachment(deps: AttachmentDeps, claim: ClaimRow, file: ReceivedFile | undefined, actor: Actor): Promise<void> {
  const storage = requireStorage(deps.storage, ", so attachments cannot be kept");
  if (!file || file.size === 0) throw new HttpError(400, "no_file", 'Choose a file to attach (form field "file"); the upload was empty.');
  const sniffed = await fileTypeFromBuffer(file.buffer);
  if (!sniffed || !ACCEPTED_TYPES[sniffed.mime]) {
    throw new HttpError(
      415,
      "unsupported_type",
      `Only photos (PNG, JPEG, WebP, GIF) and PDF documents can be attached; "${cleanName(file.originalname)}" ${sniffed ? `is a ${sniffed.mime} file by its content` : "is not a file type Ironledger recognises by its content"}. Nothing was saved.`,
    );
  }
  const key = `claims/${claim.claim_id}/${randomUUID()}.${sniffed.ext}`;
  await storage.putObject(key, file.buffer, sniffed.mime);
  await insertAttachment(
    deps.db,
    { claimId: String(claim.claim_id), s3Key: key, contentType: sniffed.mime, extension: sniffed.ext, sizeBytes: file.size, originalName: cleanName(file.originalname) },
    actor,
  );
}

/** One attachment of the claim, its bytes streamed from storage; 404 when the claim has no such attachment. */
export async function openAttachment(
  deps: AttachmentDeps,
  claim: ClaimRow,
  attachmentId: string,
): Promise<{ originalName: string; contentType: string; object: StoredObject }> {
  const a = (await claimAttachments(deps.db, String(claim.claim_id))).find((x) => String(x.attachment_id) === attachmentId);
  if (!a) throw notFound(`Attachment ${attachmentId} of claim ${claim.claim_number}`);
  const storage = requireStorage(deps.storage, "");
  return { originalName: a.original_name, contentType: a.content_type, object: await storage.getObject(a.s3_key) };
}
