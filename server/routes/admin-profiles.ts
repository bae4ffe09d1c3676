import { mkdirSync } from "node:fs";
import { unlink } from "node:fs/promises";
import path from "node:path";
import { Router, type NextFunction, type Request, type Response } from "express";
import multer from "multer";
import type pg from "pg";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { listStoredProfiles, profileHistory } from "../db/queries/profiles.js";
import { HttpError, notFound } from "../errors.js";
import { currentProfiles, DEFAULTS_AUTHOR, EtlFatalError, layouts, loadFile, requiredColumns, saveProfileVersion, storedProfile } from "../../etl/index.js";
import { previewOf } from "../services/imports/import-jobs.js";
import { profileIdSchema, profileSaveSchema, profileSchema, type Profile, type ProfileDetail, type ProfileList } from "../../shared/schemas/profiles.js";

/** The largest sample a profile can be tried against: a sample, not a monthly export (those go through Imports). */
export const PROFILE_SAMPLE_MAX_BYTES = 10 * 1024 * 1024;

const versionInfo = (r: { version: number; saved_by: string; saved_at: Date; note: string | null }) => ({
  version: r.version,
  savedBy: r.saved_by,
  savedAt: r.saved_at.toISOString(),
  note: r.note,
});

/** A profile from a request, checked by the schema the ETL reads with; refused in words, every problem named by its field. */
function parseProfile(body: unknown): Profile {
  const r = profileSchema.safeParse(body);
  if (!r.success) {
    const words = r.error.issues.map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message)).join("; ");
    throw new HttpError(400, "validation_failed", `The profile was not saved: ${words}.`, r.error.issues);
  }
  return r.data;
}

/** An ETL refusal as an answer: a profile saved meanwhile is a conflict, the rest a request that cannot be done. */
function etlRefusal(e: unknown): never {
  if (e instanceof EtlFatalError) {
    throw new HttpError(e.code === "PROFILE_CHANGED" ? 409 : 422, e.code.toLowerCase(), e.message);
  }
  throw e;
}

/**
 * Mapping profiles for administrators (stored and versioned in the warehouse, etl/profiles/profile-store.ts):
 * GET /api/admin/profiles lists them; GET /:id[?version=N] shows one with its history; PUT /:id saves an edit
 * as the next version (409 when someone saved meanwhile); POST / saves a new profile; POST /:id/test reads an
 * uploaded sample with an unsaved edit as a dry run (nothing is stored, not even a batch). Batches already
 * loaded keep the version they were read with: an edit never changes them.
 */
export function adminProfileRoutes(db: Db, pool: pg.Pool, spoolDir: string): Router {
  const router = Router();
  router.use(allow("admin"));
  const sampleDir = path.join(spoolDir, "profile-samples");
  mkdirSync(sampleDir, { recursive: true });
  const sample = multer({
    dest: sampleDir,
    limits: { fileSize: PROFILE_SAMPLE_MAX_BYTES, files: 1, fields: 3, fieldSize: 256 * 1024, fieldNameSize: 100, headerPairs: 40 },
  }).single("sample");
  const receive = (req: Request, res: Response, next: NextFunction) =>
    sample(req, res, (err: unknown) => {
      if (!err) return next();
      const code = (err as { code?: string }).code;
      if (code === "LIMIT_FILE_SIZE") {
        return next(new HttpError(413, "too_large", `A sample is at most ${PROFILE_SAMPLE_MAX_BYTES / 1048576} MB: cut the export to its first few thousand lines. Nothing was loaded.`));
      }
      if (code?.startsWith("LIMIT_")) return next(new HttpError(400, "bad_upload", 'Send one file in the form field "sample" and the profile in the field "profile".'));
      next(err);
    });

  router.get("/", async (_req, res) => {
    await currentProfiles(pool); // seeds the defaults on a fresh warehouse
    const rows = await listStoredProfiles(db);
    const body: ProfileList = {
      profiles: rows.map((r) => {
        const p = profileSchema.safeParse(r.body);
        return {
          id: r.profile_id,
          kind: r.kind as Profile["kind"],
          description: p.success ? p.data.description : "",
          latest: versionInfo(r),
          versions: r.versions,
          batches: r.batches,
          isDefault: r.saved_by === DEFAULTS_AUTHOR,
        };
      }),
    };
    res.json(body);
  });

  const detail = async (id: string, version?: number): Promise<ProfileDetail> => {
    const v = await storedProfile(pool, id, version);
    if (!v) throw notFound(version === undefined ? `A profile named "${id.slice(0, 60)}"` : `Version ${version} of profile ${id}`);
    const history = await profileHistory(db, id);
    const required = new Set(requiredColumns[v.profile.kind]);
    const shops = await db.selectFrom("dim_shop").select("shop_code").orderBy("shop_code").execute();
    return {
      profile: v.profile,
      version: v.version!,
      latestVersion: history[0]?.version ?? v.version!,
      history: history.map((h) => ({ ...versionInfo(h), batches: h.batches })),
      layout: layouts[v.profile.kind].map((column) => ({ column, required: required.has(column) })),
      shops: shops.map((s) => s.shop_code),
    };
  };

  const idParam = (req: Request) => {
    const raw = String(req.params.id);
    const id = profileIdSchema.safeParse(raw);
    if (!id.success) throw notFound(`A profile named "${raw.slice(0, 60)}"`);
    return id.data;
  };

  router.get("/:id", async (req, res) => {
    const q = req.query.version;
    const version = q === undefined ? undefined : Number(q);
    if (version !== undefined && (!Number.isInteger(version) || version < 1)) throw new HttpError(400, "validation_failed", "version: a version is a whole number from 1.");
    res.json(await detail(idParam(req), version));
  });

  const savedBy = (req: Request) => {
    const u = requireUser(req);
    return u.name || u.email || u.sub;
  };

  router.put("/:id", async (req, res) => {
    const id = idParam(req);
    const body = profileSaveSchema.parse(req.body ?? {});
    const profile = parseProfile(body.profile);
    if (profile.id !== id) throw new HttpError(400, "validation_failed", `The profile was not saved: its name (${id}) cannot change; save a copy under a new name instead.`);
    if (body.basedOn === null) throw new HttpError(400, "validation_failed", "The profile was not saved: say which version the edit started from (basedOn).");
    if (!(await storedProfile(pool, id))) throw notFound(`A profile named "${id}"`);
    await saveProfileVersion(pool, profile, body.basedOn, savedBy(req), body.note || null).catch(etlRefusal);
    res.json(await detail(id));
  });

  router.post("/", async (req, res) => {
    const body = profileSaveSchema.parse(req.body ?? {});
    const profile = parseProfile(body.profile);
    await saveProfileVersion(pool, profile, null, savedBy(req), body.note || null).catch(etlRefusal);
    res.status(201).json(await detail(profile.id));
  });

  router.post("/:id/test", receive, async (req, res) => {
    const file = req.file;
    try {
      const id = idParam(req);
      if (!file) throw new HttpError(400, "no_file", 'Choose a sample export file (form field "sample").');
      let draftBody: unknown;
      try {
        draftBody = JSON.parse(String((req.body as { profile?: unknown }).profile ?? ""));
      } catch {
        throw new HttpError(400, "validation_failed", 'Send the profile to try as JSON in the form field "profile".');
      }
      const draft = parseProfile(draftBody);
      if (draft.id !== id) throw new HttpError(400, "validation_failed", `The profile sent is ${draft.id}, not ${id}.`);
      const shopField = (req.body as { shop?: unknown }).shop;
      const shop = typeof shopField === "string" && shopField.trim() ? shopField.trim() : undefined;
      const s = await loadFile(pool, {
        path: file.path, fileName: file.originalname, profile: id, profileDraft: draft, shop, dryRun: true, previewRows: 20, loadedBy: savedBy(req),
      }).catch(etlRefusal);
      res.json({ profile: id, preview: previewOf(s) });
    } finally {
      if (file) await unlink(file.path).catch(() => undefined);
    }
  });

  return router;
}
