import { Router, type Request } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { lifeQuerySchema } from "../../shared/schemas/analytics-life.js";
import { costRecurrences, lifeUnits, recurrences } from "../db/queries/analytics-life.js";
import { coldShopCodes } from "../db/queries/shops.js";
import { lifeRoles } from "../../shared/roles.js";
import { AnswerCache } from "../services/answer-cache.js";
import { lifeOnWorker } from "../services/life-curves/life-pool.js";

/**
 * /api/analytics/life: Weibull, Kaplan–Meier, MCF and cost MCF for one component (with the B-life asked for, B1–B50). The rows come from SQL here; the fits
 * run on a worker thread (services/life-curves); each answer is kept per request and data version.
 */
export function analyticsLifeRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...lifeRoles));
  // Fits and curves change only when the warehouse does: cache each answer per request and data version.
  const answers = new AnswerCache(db, 200);

  const load = async (req: Request) => {
    const f = analyticsFiltersSchema.parse(req.query);
    const q = lifeQuerySchema.parse(req.query);
    const cold = q.compareBy === "climate" ? await coldShopCodes(db) : new Set<string>();
    return { f, q, cold };
  };

  router.get("/weibull", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => weibull(req));
  });
  const weibull = async (req: Request) => {
    const { f, q, cold } = await load(req);
    return lifeOnWorker({ kind: "weibull", units: await lifeUnits(db, requireScope(req), f, q.component), q, cold });
  };

  router.get("/kaplan-meier", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => km(req));
  });
  const km = async (req: Request) => {
    const { f, q, cold } = await load(req);
    return lifeOnWorker({ kind: "kaplan-meier", units: await lifeUnits(db, requireScope(req), f, q.component), q, cold });
  };

  router.get("/mcf", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => mcf(req));
  });
  const mcf = async (req: Request) => {
    const f = analyticsFiltersSchema.parse(req.query);
    const q = lifeQuerySchema.parse({ component: "HYD-LIN-HOSE", ...req.query });
    const cold = q.compareBy === "climate" ? await coldShopCodes(db) : new Set<string>();
    return lifeOnWorker({ kind: "mcf", rows: await recurrences(db, requireScope(req), f, q.component), q, cold });
  };

  router.get("/cost-mcf", async (req, res) => {
    await answers.send(req, res, requireScope(req), () => costMcf(req));
  });
  const costMcf = async (req: Request) => {
    const f = analyticsFiltersSchema.parse(req.query);
    const q = lifeQuerySchema.parse({ component: "HYD-LIN-HOSE", ...req.query });
    const cold = q.compareBy === "climate" ? await coldShopCodes(db) : new Set<string>();
    return lifeOnWorker({ kind: "cost-mcf", rows: await costRecurrences(db, requireScope(req), f, q.component), q, cold });
  };
  return router;
}
