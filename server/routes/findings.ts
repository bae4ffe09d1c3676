import { Router } from "express";
import { allow, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { changeFinding, findingWork, listFindingStates } from "../db/queries/findings.js";
import { HttpError, notFound } from "../errors.js";
import { findingChangeSchema, type FindingWork } from "../../shared/schemas/findings.js";
import { findingReadRoles, findingWorkRoles, type Role } from "../../shared/roles.js";

const canWork = (roles: readonly Role[]) => roles.some((r) => (findingWorkRoles as readonly Role[]).includes(r));

/**
 * Findings worked from new to closed: GET /api/findings lists every tracked finding's state (status, owner,
 * how the last load moved it); GET /:key gives one with its history; POST /:key changes its status (a
 * dismissal with its reason), owner or adds a note. Group-wide roles read them (a finding's words may name any
 * shop); analysts, directors and admins work them, and only they are offered the actions.
 */
export function findingRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...findingReadRoles));

  router.get("/", async (req, res) => {
    res.json({ states: await listFindingStates(db), canWork: canWork(requireUser(req).roles) });
  });

  const keyOf = (raw: string) => {
    if (raw.length > 300) throw notFound("That finding");
    return raw;
  };

  router.get("/:key", async (req, res) => {
    const w = await findingWork(db, keyOf(String(req.params.key)));
    if (!w) throw notFound("That finding");
    const body: FindingWork = { ...w, canWork: canWork(requireUser(req).roles) };
    res.json(body);
  });

  router.post("/:key", allow(...findingWorkRoles), async (req, res) => {
    const key = keyOf(String(req.params.key));
    const parsed = findingChangeSchema.safeParse(req.body ?? {});
    if (!parsed.success) throw new HttpError(400, "validation_failed", `Nothing was changed: ${parsed.error.issues.map((i) => i.message).join("; ")}.`, parsed.error.issues);
    const u = requireUser(req);
    if (!(await changeFinding(db, key, parsed.data, { name: u.name || u.email || u.sub, sub: u.sub }))) throw notFound("That finding");
    res.json({ ...(await findingWork(db, key))!, canWork: true } satisfies FindingWork);
  });

  return router;
}
