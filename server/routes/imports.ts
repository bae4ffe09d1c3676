import { mkdirSync } from "node:fs";
import { Router, type NextFunction, type Request, type Response } from "express";
import multer from "multer";
import { pipeline } from "node:stream/promises";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import { HttpError } from "../errors.js";
import { batchHistory, batchRejects, batchRejectsCsv } from "../services/imports/batches.js";
import type { ImportDeps } from "../services/imports/import-jobs.js";
import { cancelLoad, present, receiveUploads, recentUploads, recheck, startLoad, uploadFor } from "../services/imports/uploads.js";
import { importRoles } from "../../shared/roles.js";
import { batchIdParamSchema, batchListQuerySchema, importChoicesSchema, rejectQuerySchema, type ImportProfileList } from "../../shared/schemas/imports.js";
import { currentProfiles } from "../../etl/index.js";

export interface ImportRouteDeps extends ImportDeps {
  /** the largest file accepted, in bytes */
  maxUploadBytes: number;
}

/** Who a request acts for: the subject (whose uploads are theirs) and the name the history shows. */
const actor = (req: Request) => requireUser(req).sub;
const actorName = (req: Request) => {
  const u = requireUser(req);
  return { name: u.name || u.email || u.sub, sub: u.sub };
};

/**
 * /api/imports: export files fed from the browser (upload → check → load, see services/imports). Admins
 * and analysts for every shop, managers for their own (a file naming another shop is refused before it loads).
 */
export function importRoutes(deps: ImportRouteDeps): Router {
  const router = Router();
  router.use(allow(...importRoles));
  mkdirSync(deps.spoolDir, { recursive: true });
  // streamed to disk as it arrives, never held whole in memory
  const upload = multer({
    dest: deps.spoolDir,
    limits: { fileSize: deps.maxUploadBytes, files: 20, fields: 5, fieldSize: 1024, fieldNameSize: 100, headerPairs: 40 },
  }).array("files", 20);
  const receive = (req: Request, res: Response, next: NextFunction) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      const code = (err as { code?: string }).code;
      if (code === "LIMIT_FILE_SIZE") {
        return next(new HttpError(413, "too_large", `A file is larger than ${Math.round(deps.maxUploadBytes / 1048576)} MB, the most one upload may be. Nothing was saved; split the export by month.`));
      }
      if (code?.startsWith("LIMIT_")) return next(new HttpError(400, "bad_upload", "Send at most 20 export files at a time, and nothing else with them."));
      next(err);
    });

  router.post("/", receive, async (req, res) => {
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    if (files.length === 0) throw new HttpError(400, "no_file", "Choose at least one export file to upload.");
    const imports = await receiveUploads(deps, files, actorName(req), requireScope(req));
    res.status(201).json({ imports });
  });

  router.get("/", async (req, res) => {
    res.json({ imports: await recentUploads(deps.db, actor(req), requireScope(req)) });
  });

  // the profiles a file can be read with (latest versions), for the choices of a check
  router.get("/profiles", async (_req, res) => {
    const body: ImportProfileList = { profiles: (await currentProfiles(deps.pool)).map((v) => ({ id: v.profile.id, kind: v.profile.kind, version: v.version! })) };
    res.json(body);
  });

  router.get("/:id", async (req, res) => {
    res.json(present(await uploadFor(deps.db, String(req.params.id), actor(req), requireScope(req))));
  });

  router.post("/:id/check", async (req, res) => {
    const choices = importChoicesSchema.parse(req.body ?? {});
    const u = await uploadFor(deps.db, String(req.params.id), actor(req), requireScope(req));
    res.json(await recheck(deps, u, choices));
  });

  router.post("/:id/load", async (req, res) => {
    const u = await uploadFor(deps.db, String(req.params.id), actor(req), requireScope(req));
    res.status(202).json(await startLoad(deps, u));
  });

  router.post("/:id/cancel", async (req, res) => {
    const u = await uploadFor(deps.db, String(req.params.id), actor(req), requireScope(req));
    res.json(await cancelLoad(deps.db, u));
  });

  router.get("/:id/file", async (req, res) => {
    const u = await uploadFor(deps.db, String(req.params.id), actor(req), requireScope(req));
    const name = u.file_name.replace(/[^\w.\-]+/g, "_");
    res.setHeader("Content-Type", "text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="${name}"`);
    if (u.object_key && deps.storage) {
      const obj = await deps.storage.getObject(u.object_key, ", so the original file cannot be downloaded");
      if (obj.contentLength !== undefined) res.setHeader("Content-Length", String(obj.contentLength));
      await pipeline(obj.body, res);
      return;
    }
    res.sendFile(u.spool_path);
  });

  return router;
}

/** /api/batches: the load history and each batch's rejects (same roles and scope as imports). */
export function batchRoutes(deps: Pick<ImportDeps, "db">): Router {
  const router = Router();
  router.use(allow(...importRoles));

  router.get("/", async (req, res) => {
    const q = batchListQuerySchema.parse(req.query);
    res.json({ batches: await batchHistory(deps.db, requireScope(req), actor(req), q) });
  });

  router.get("/:id/rejects", async (req, res) => {
    const { id } = batchIdParamSchema.parse(req.params);
    res.json(await batchRejects(deps.db, requireScope(req), actor(req), id, rejectQuerySchema.parse(req.query)));
  });

  router.get("/:id/rejects.csv", async (req, res) => {
    const { id } = batchIdParamSchema.parse(req.params);
    const reason = rejectQuerySchema.parse(req.query).reason;
    const { name, csv } = await batchRejectsCsv(deps.db, requireScope(req), actor(req), id, reason);
    res.setHeader("Content-Type", "text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="${name}"`);
    res.send(csv);
  });

  return router;
}
