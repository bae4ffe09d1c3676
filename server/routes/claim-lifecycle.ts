import { Router, type Request } from "express";
import { requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { Storage } from "../services/storage.js";
import type { Mailer } from "../services/mailer.js";
import { lineInclusionSchema, resubmitSchema } from "../../shared/schemas/claim-lifecycle.js";
import { claimDetail } from "../services/warranty/claims-service.js";
import { changeLineInclusion, claimMoney, resubmitClaim } from "../services/warranty/lifecycle.js";

/**
 * A claim's money and versions, mounted inside the claims router (behind its roles): the money report, a line
 * included deliberately or left out again, and a rejected claim corrected as its next version.
 */
export function claimLifecycleRoutes(d: { db: Db; storage?: Storage; mailer?: Mailer }): Router {
  const router = Router();
  const { db } = d;
  const actor = (req: Request) => {
    const u = requireUser(req);
    return { sub: u.sub, name: u.name };
  };
  const detail = (req: Request, id: string) => claimDetail({ db, storage: d.storage, canSend: Boolean(d.mailer) }, requireScope(req), id);

  router.get("/money", async (req, res) => {
    res.json(await claimMoney(db, requireScope(req)));
  });

  router.post("/:id/lines/:lineId/inclusion", async (req, res) => {
    const body = lineInclusionSchema.parse(req.body);
    const id = String(req.params.id);
    await changeLineInclusion(db, requireScope(req), id, String(req.params.lineId), body, actor(req));
    res.json(await detail(req, id));
  });

  router.post("/:id/resubmit", async (req, res) => {
    const body = resubmitSchema.parse(req.body);
    const next = await resubmitClaim(db, requireScope(req), String(req.params.id), body.correction, actor(req));
    res.status(201).json(await detail(req, next));
  });

  return router;
}
