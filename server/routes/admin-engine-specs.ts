import { Router, type Request } from "express";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { currentSpec, currentSpecs, knownFamilies, saveSpecVersion, specHistory } from "../db/queries/engine-family-specs.js";
import { HttpError, notFound } from "../errors.js";
import { allRoles } from "../../shared/roles.js";
import {
  engineSpecFamilySchema, engineSpecSaveSchema, type EngineSpecCurrent, type EngineSpecDetail, type EngineSpecList,
} from "../../shared/schemas/engine-specs.js";

/** A known engine family from the path, or 404 in words. */
async function familyParam(db: Db, req: Request): Promise<{ code: string; description: string | null }> {
  const raw = String(req.params.family);
  const f = engineSpecFamilySchema.safeParse(raw);
  const known = f.success ? (await knownFamilies(db)).find((k) => k.code === f.data) : undefined;
  if (!known) throw notFound(`Engine family "${raw.slice(0, 40)}"`);
  return known;
}

/**
 * An engine family's own figures for administrators, versioned (server/db/queries/engine-family-specs.ts): GET /
 * lists every known family with its current figures (or none); GET /:family shows the current figures and every
 * version; PUT /:family saves the figures as the family's next version (409 when someone saved meanwhile).
 */
export function adminEngineSpecRoutes(db: Db): Router {
  const router = Router();
  router.use(allow("admin"));

  router.get("/", async (_req, res) => {
    const [families, specs] = await Promise.all([knownFamilies(db), currentSpecs(db)]);
    const body: EngineSpecList = {
      families: families.map((f) => ({ engineFamily: f.code, description: f.description, current: specs.get(f.code)?.spec ?? null, versions: specs.get(f.code)?.versions ?? 0 })),
    };
    res.json(body);
  });

  const detail = async (f: { code: string; description: string | null }): Promise<EngineSpecDetail> => {
    const history = await specHistory(db, f.code);
    return { engineFamily: f.code, description: f.description, current: history[0] ?? null, history };
  };

  router.get("/:family", async (req, res) => {
    res.json(await detail(await familyParam(db, req)));
  });

  router.put("/:family", async (req, res) => {
    const f = await familyParam(db, req);
    const body: unknown = req.body;
    if (typeof body !== "object" || body === null || Array.isArray(body)) {
      throw new HttpError(400, "validation_failed", "The figures were not saved: send them as a JSON object (spec, basedOn, note).");
    }
    const r = engineSpecSaveSchema.safeParse(body);
    if (!r.success) {
      const words = r.error.issues.map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message)).join("; ");
      throw new HttpError(400, "validation_failed", `The figures were not saved: ${words}.`, r.error.issues);
    }
    const u = requireUser(req);
    const out = await saveSpecVersion(db, f.code, r.data.spec, r.data.basedOn, u.name || u.email || u.sub, r.data.note);
    if (!out.saved) {
      const opened = r.data.basedOn === null ? "with no figures" : `at version ${r.data.basedOn}`;
      throw new HttpError(
        409,
        "spec_changed",
        `The figures for ${f.code} are at version ${out.latest ?? "none"} now; you opened them ${opened}. Open them again and redo your change. Nothing was saved.`,
      );
    }
    res.json(await detail(f));
  });

  return router;
}

/** GET /:family for every signed-in role: the figures a family's readings are judged against, or null (the generic bands). */
export function engineSpecRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...allRoles));
  router.get("/:family", async (req, res) => {
    const f = await familyParam(db, req);
    const body: EngineSpecCurrent = { engineFamily: f.code, current: await currentSpec(db, f.code) };
    res.json(body);
  });
  return router;
}
