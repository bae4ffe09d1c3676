import { Router, type Request } from "express";
import type { z } from "zod";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { listCurrentPolicies, policyHistory, savePolicyVersion, termsOfRow, type PolicyVersionRow } from "../db/queries/warranty-policies.js";
import { HttpError, notFound } from "../errors.js";
import {
  engineFamilySchema, familyWords, policyCreateSchema, policySaveSchema, type PolicyDetail, type PolicyList,
} from "../../shared/schemas/warranty-policies.js";

const versionInfo = (r: PolicyVersionRow) => ({
  version: r.version,
  savedBy: r.saved_by,
  savedAt: r.saved_at.toISOString(),
  note: r.note,
  claims: r.claims,
});

/** The request body checked by the policy's rules; refused in words (400 validation_failed), every problem named by its field. */
function parseBody<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const body: unknown = req.body;
  if (typeof body !== "object" || body === null || Array.isArray(body)) {
    throw new HttpError(400, "validation_failed", "The policy was not saved: send it as a JSON object (policy, basedOn, note).");
  }
  const r = schema.safeParse(body);
  if (!r.success) {
    const words = r.error.issues.map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message)).join("; ");
    throw new HttpError(400, "validation_failed", `The policy was not saved: ${words}.`, r.error.issues);
  }
  return r.data;
}

const familyParam = (req: Request) => {
  const raw = String(req.params.family);
  const f = engineFamilySchema.safeParse(raw);
  if (!f.success) throw notFound(`A warranty policy for "${raw.slice(0, 40)}"`);
  return f.data;
};

const savedBy = (req: Request) => {
  const u = requireUser(req);
  return u.name || u.email || u.sub;
};

/**
 * Warranty policies for administrators, versioned (server/db/queries/warranty-policies.ts): GET / lists each
 * engine family's current version; GET /:family[?version=N] shows one version with the family's history; PUT
 * /:family saves an edit as the next version (409 when someone saved meanwhile); POST / starts a policy for a
 * family that has none. Claims keep the version they were judged under: a save never changes them.
 */
export function adminWarrantyPolicyRoutes(db: Db): Router {
  const router = Router();
  router.use(allow("admin"));

  router.get("/", async (_req, res) => {
    const rows = await listCurrentPolicies(db);
    const body: PolicyList = {
      policies: rows.map((r) => ({ engineFamily: r.engine_family, familyWords: familyWords(r.engine_family), current: termsOfRow(r), latest: versionInfo(r), versions: r.versions })),
    };
    res.json(body);
  });

  const detail = async (family: string, version?: number): Promise<PolicyDetail> => {
    const history = await policyHistory(db, family);
    if (history.length === 0) throw notFound(`A warranty policy for ${familyWords(family)}`);
    const shown = version === undefined ? history[0] : history.find((h) => h.version === version);
    if (!shown) throw notFound(`Version ${version} of the warranty policy for ${familyWords(family)}`);
    return {
      engineFamily: family,
      familyWords: familyWords(family),
      version: shown.version,
      latestVersion: history[0].version,
      policy: termsOfRow(shown),
      history: history.map((h) => ({ ...versionInfo(h), policy: termsOfRow(h) })),
    };
  };

  router.get("/:family", async (req, res) => {
    const q = req.query.version;
    const version = q === undefined ? undefined : Number(q);
    if (version !== undefined && (!Number.isInteger(version) || version < 1)) throw new HttpError(400, "validation_failed", "version: a version is a whole number from 1.");
    res.json(await detail(familyParam(req), version));
  });

  router.put("/:family", async (req, res) => {
    const family = familyParam(req);
    const body = parseBody(policySaveSchema, req);
    if ((await policyHistory(db, family)).length === 0) throw notFound(`A warranty policy for ${familyWords(family)}`);
    const out = await savePolicyVersion(db, family, body.policy, body.basedOn, savedBy(req), body.note);
    if (!out.saved) {
      throw new HttpError(
        409,
        "policy_changed",
        `The policy for ${familyWords(family)} was saved as version ${out.latest} after you opened version ${body.basedOn}; open it again and redo your change. Nothing was saved.`,
      );
    }
    res.json(await detail(family));
  });

  router.post("/", async (req, res) => {
    const body = parseBody(policyCreateSchema, req);
    const out = await savePolicyVersion(db, body.engineFamily, body.policy, null, savedBy(req), body.note);
    if (!out.saved) {
      throw new HttpError(409, "policy_exists", `${body.engineFamily === "*" ? "The group default" : `Engine family ${body.engineFamily}`} has a policy already (version ${out.latest}); edit it instead.`);
    }
    res.status(201).json(await detail(body.engineFamily));
  });

  return router;
}
