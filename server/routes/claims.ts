import { Router, type NextFunction, type Request, type Response } from "express";
import multer from "multer";
import { pipeline } from "node:stream/promises";
import type PgBoss from "pg-boss";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { readSettings } from "../db/queries/settings.js";
import type { Storage } from "../services/storage.js";
import type { Mailer } from "../services/mailer.js";
import { HttpError } from "../errors.js";
import { claimCandidateQuerySchema, claimPreviewQuerySchema, createClaimSchema, statusChangeSchema } from "../../shared/schemas/claims.js";
import { claimDetail, claimInScope, claimQueue, createClaim, packetPdf, previewClaim } from "../services/warranty/claims-service.js";
import { unclaimedLinesPage } from "../services/warranty/claim-queue.js";
import { addAttachment, MAX_ATTACHMENT_BYTES, openAttachment } from "../services/warranty/attachments.js";
import { changeClaimStatus } from "../services/warranty/change-status.js";
import { claimLinesCsv } from "../services/warranty/lines-csv.js";
import { sendPacket } from "../services/warranty/send.js";
import { claimRoles } from "../../shared/roles.js";

export interface ClaimRouteDeps {
  db: Db;
  storage?: Storage;
  mailer?: Mailer;
  boss?: PgBoss | null;
}


const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_ATTACHMENT_BYTES, files: 1, fields: 5, fieldSize: 4096, fieldNameSize: 100, headerPairs: 20 } }).single("file");

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

const asciiName = (s: string) => s.replace(/[^\w.\-]+/g, "_");

export function claimRoutes(d: ClaimRouteDeps): Router {
  const router = Router();
  const { db } = d;
  router.use(allow(...claimRoles));

  const claimOr404 = (req: Request) => claimInScope(db, requireScope(req), String(req.params.id));
  const detail = (req: Request) => claimDetail({ db, storage: d.storage, canSend: Boolean(d.mailer) }, requireScope(req), String(req.params.id));
  const actor = (req: Request) => {
    const u = requireUser(req);
    return { sub: u.sub, name: u.name };
  };

  router.get("/", async (req, res) => {
    res.json(await claimQueue(db, requireScope(req)));
  });

  router.get("/candidates", async (req, res) => {
    res.json(await unclaimedLinesPage(db, requireScope(req), claimCandidateQuerySchema.parse(req.query)));
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
    await changeClaimStatus(db, c, statusChangeSchema.parse(req.body), actor(req));
    res.json(await detail(req));
  });

  router.post("/:id/attachments", receiveFile, async (req, res) => {
    const c = await claimOr404(req);
    await addAttachment(d, c, req.file, actor(req));
    res.status(201).json(await detail(req));
  });

  router.get("/:id/attachments/:attachmentId", async (req, res) => {
    const c = await claimOr404(req);
    const a = await openAttachment(d, c, String(req.params.attachmentId));
    res.setHeader("content-type", a.contentType);
    // written by hand: res.attachment() only writes "attachment", and a photo or PDF opened from the claim is shown inline
    res.setHeader("content-disposition", `inline; filename="${asciiName(a.originalName)}"`);
    res.setHeader("cache-control", "private, max-age=3600");
    if (a.object.contentLength !== undefined) res.setHeader("content-length", String(a.object.contentLength));
    await pipeline(a.object.body, res);
  });

  router.get("/:id/packet.pdf", async (req, res) => {
    const view = await detail(req);
    const pdf = await packetPdf(d, view);
    res.attachment(`${view.claimNumber}.pdf`).type("application/pdf").send(pdf);
  });

  router.get("/:id/lines.csv", async (req, res) => {
    const view = await detail(req);
    res.attachment(`${view.claimNumber}-lines.csv`).type("text/csv; charset=utf-8").send(claimLinesCsv(view.claimNumber, view.lines, (await readSettings(d.db)).currency));
  });

  router.post("/:id/send", async (req, res) => {
    await sendPacket(d, await detail(req), actor(req));
    const after = await detail(req);
    res.status(after.sends.at(-1)?.status === "sent" ? 200 : 202).json(after);
  });

  return router;
}
