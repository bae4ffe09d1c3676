import { Router, type NextFunction, type Request, type Response } from "express";
import multer from "multer";
import { randomUUID } from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import { PutObjectCommand } from "@aws-sdk/client-s3";
import type PgBoss from "pg-boss";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { Storage } from "../services/storage.js";
import type { Mailer } from "../services/mailer.js";
import { HttpError, notFound } from "../errors.js";
import { claimPreviewQuerySchema, createClaimSchema, statusChangeSchema } from "../../shared/schemas/claims.js";
import { claimAttachments, getClaim, insertAttachment, updateClaimStatus } from "../db/queries/claims.js";
import { claimDetail, claimQueue, createClaim, packetSnapshot, previewClaim, readObject, unclaimedCandidates } from "../warranty/claims-service.js";
import { checkMove, type ClaimStatus } from "../warranty/status.js";
import { renderPacket } from "../warranty/packet.js";
import { claimLinesCsv } from "../warranty/lines-csv.js";
import { requestSend } from "../warranty/send.js";

export interface ClaimRouteDeps {
  db: Db;
  storage?: Storage;
  mailer?: Mailer;
  boss?: PgBoss | null;
}

/** Clerks work every shop's claims; managers their own shops'. */
export const CLAIM_ROLES = ["clerk", "manager"] as const;

export const MAX_ATTACHMENT_BYTES = 8 * 1024 * 1024;
const ACCEPTED_TYPES: Record<string, string> = {
  "image/png": "PNG image",
  "image/jpeg": "JPEG image",
  "image/webp": "WebP image",
  "image/gif": "GIF image",
  "application/pdf": "PDF document",
};

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_ATTACHMENT_BYTES, files: 1, fields: 5 } }).single("file");

/** multer's size error in words, with the limit. */
function receiveFile(req: Request, res: Response, next: NextFunction) {
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    const code = (err as { code?: string }).code;
    if (code === "LIMIT_FILE_SIZE") return next(new HttpError(413, "too_large", `The file is larger than ${MAX_ATTACHMENT_BYTES / 1024 / 1024} MB, the most a claim attachment may be. Nothing was saved.`));
    if (code === "LIMIT_UNEXPECTED_FILE" || code === "LIMIT_FILE_COUNT") return next(new HttpError(400, "one_file", 'Send one file in the form field "file".'));
    next(err);
  });
}

/** multer hands over the name as latin1; browsers send UTF-8. Keep the base name only, without control characters. */
function cleanName(name: string): string {
  const utf8 = Buffer.from(name, "latin1").toString("utf8");
  const base = utf8.split(/[\\/]/).pop() ?? "file";
  return base.replace(/[\u0000-\u001f\u007f"]/g, "").slice(0, 200) || "file";
}

const asciiName = (s: string) => s.replace(/[^\w.\-]+/g, "_");

export function claimRoutes(d: ClaimRouteDeps): Router {
  const router = Router();
  const { db } = d;
  router.use(allow(...CLAIM_ROLES));

  const claimOr404 = async (req: Request) => {
    const c = await getClaim(db, requireScope(req), String(req.params.id));
    if (!c) throw notFound(`Claim ${req.params.id}`);
    return c;
  };
  const detail = (req: Request) => claimDetail({ db, storage: d.storage, canSend: Boolean(d.mailer) }, requireScope(req), String(req.params.id));
  const actor = (req: Request) => {
    const u = requireUser(req);
    return { sub: u.sub, name: u.name };
  };

  router.get("/", async (req, res) => {
    res.json(await claimQueue(db, requireScope(req)));
  });

  router.get("/candidates", async (req, res) => {
    res.json({ candidates: await unclaimedCandidates(db, requireScope(req)) });
  });

  router.get("/preview", async (req, res) => {
    const raw = Object.fromEntries(Object.entries(req.query).map(([k, v]) => [k, String(v)]));
    const q = claimPreviewQuerySchema.parse(raw);
    const { repairLine: _r, cluster: _c, ...clusterQuery } = raw;
    res.json(await previewClaim(db, requireScope(req), q, clusterQuery));
  });

  router.post("/", async (req, res) => {
    const body = createClaimSchema.parse(req.body);
    const scope = requireScope(req);
    if (body.kind === "campaign" && scope.kind !== "all")
      throw new HttpError(403, "forbidden", "Campaign cases span shops: the warranty clerk makes them.");
    const id = await createClaim(db, scope, actor(req), body);
    res.status(201).json(await claimDetail({ db, storage: d.storage, canSend: Boolean(d.mailer) }, scope, id));
  });

  router.get("/:id", async (req, res) => {
    res.json(await detail(req));
  });

  router.post("/:id/status", async (req, res) => {
    const c = await claimOr404(req);
    const change = statusChangeSchema.parse(req.body);
    const from = c.status as ClaimStatus;
    const verdict = checkMove(from, change);
    if (!verdict.ok) throw new HttpError(409, "illegal_move", verdict.message, { from, to: change.to });
    const moved = await updateClaimStatus(db, String(c.claim_id), from, change.to, { reason: change.reason ?? null, amount: change.amount ?? null }, actor(req));
    if (!moved) throw new HttpError(409, "changed_meanwhile", "Someone changed this claim's status a moment ago. Reload the claim and try again.");
    res.json(await detail(req));
  });

  router.post("/:id/attachments", receiveFile, async (req, res) => {
    const c = await claimOr404(req);
    if (!d.storage) throw new HttpError(503, "storage_unavailable", "Object storage is not configured on this server, so attachments cannot be kept.");
    const file = req.file;
    if (!file || file.size === 0) throw new HttpError(400, "no_file", 'Choose a file to attach (form field "file"); the upload was empty.');
    const sniffed = await fileTypeFromBuffer(file.buffer);
    if (!sniffed || !ACCEPTED_TYPES[sniffed.mime]) {
      throw new HttpError(
        415,
        "unsupported_type",
        `Only photos (PNG, JPEG, WebP, GIF) and PDF documents can be attached; "${cleanName(file.originalname)}" ${sniffed ? `is a ${sniffed.mime} file by its content` : "is not a file type Ironledger recognises by its content"}. Nothing was saved.`,
      );
    }
    const key = `claims/${c.claim_id}/${randomUUID()}.${sniffed.ext}`;
    await d.storage.client.send(new PutObjectCommand({ Bucket: d.storage.bucket, Key: key, Body: file.buffer, ContentType: sniffed.mime }));
    await insertAttachment(db, { claimId: String(c.claim_id), s3Key: key, contentType: sniffed.mime, extension: sniffed.ext, sizeBytes: file.size, originalName: cleanName(file.originalname) }, actor(req));
    res.status(201).json(await detail(req));
  });

  router.get("/:id/attachments/:attachmentId", async (req, res) => {
    const c = await claimOr404(req);
    const a = (await claimAttachments(db, String(c.claim_id))).find((x) => String(x.attachment_id) === req.params.attachmentId);
    if (!a) throw notFound(`Attachment ${req.params.attachmentId} of claim ${c.claim_number}`);
    if (!d.storage) throw new HttpError(503, "storage_unavailable", "Object storage is not configured on this server.");
    const body = await readObject(d.storage, a.s3_key);
    res.setHeader("content-type", a.content_type);
    res.setHeader("content-disposition", `inline; filename="${asciiName(a.original_name)}"`);
    res.setHeader("cache-control", "private, max-age=3600");
    res.send(body);
  });

  router.get("/:id/packet.pdf", async (req, res) => {
    const view = await detail(req);
    const pdf = await renderPacket(await packetSnapshot(d, view));
    res.setHeader("content-type", "application/pdf");
    res.setHeader("content-disposition", `attachment; filename="${view.claimNumber}.pdf"`);
    res.send(pdf);
  });

  router.get("/:id/lines.csv", async (req, res) => {
    const view = await detail(req);
    res.setHeader("content-type", "text/csv; charset=utf-8");
    res.setHeader("content-disposition", `attachment; filename="${view.claimNumber}-lines.csv"`);
    res.send(claimLinesCsv(view.claimNumber, view.lines));
  });

  router.post("/:id/send", async (req, res) => {
    const view = await detail(req);
    if (!d.mailer) throw new HttpError(503, "mail_unavailable", "Mail is not configured on this server, so the packet cannot be sent from here. Download it instead.");
    const pending = view.sends.at(-1);
    if (pending && (pending.status === "queued" || pending.status === "sending"))
      throw new HttpError(409, "send_pending", `This packet is already ${pending.status === "queued" ? "queued for a retry" : "being sent"} to ${pending.toAddress}; it will go once the mail server takes it.`);
    await requestSend({ db, mailer: d.mailer, storage: d.storage, boss: d.boss }, view.id, view.warrantyEmail, actor(req));
    const after = await detail(req);
    res.status(after.sends.at(-1)?.status === "sent" ? 200 : 202).json(after);
  });

  return router;
}
