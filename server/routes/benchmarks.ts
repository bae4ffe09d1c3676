/**
 * /api/benchmarks: shop benchmarks, funnel, trend and the comeback pairs behind a figure, computed by the
 * benchmarks service. Parses the query, checks role and scope, and answers.
 */
import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { scopeIncludes } from "../db/queries/scope.js";
import { forbidden, notFound } from "../errors.js";
import { benchmarkService } from "../services/benchmarks/service.js";
import { benchmarkQuerySchema, comebackPairsQuerySchema, trendQuerySchema } from "../../shared/schemas/benchmarks.js";

const BENCHMARK_ROLES = ["director", "analyst", "manager", "admin"] as const;

/** `peerSecret` keys the letters that stand for the shops a caller may not name. */
export function benchmarkRoutes(db: Db, peerSecret: string): Router {
  const router = Router();
  const benchmarks = benchmarkService(db, peerSecret);
  router.use(allow(...BENCHMARK_ROLES));

  router.get("/shops", async (req, res) => {
    res.json(await benchmarks.shops(requireScope(req), benchmarkQuerySchema.parse(req.query)));
  });

  router.get("/funnel", async (req, res) => {
    res.json(await benchmarks.funnel(requireScope(req), benchmarkQuerySchema.parse(req.query)));
  });

  router.get("/trend", async (req, res) => {
    res.json(await benchmarks.trend(requireScope(req), trendQuerySchema.parse(req.query)));
  });

  router.get("/comebacks", async (req, res) => {
    const scope = requireScope(req);
    const q = comebackPairsQuerySchema.parse(req.query);
    const refused = () => forbidden("the comeback pairs of a shop outside your scope");
    if (!scopeIncludes(scope, q.shop)) throw refused();
    const body = await benchmarks.comebackPairs(scope, q);
    if (!body) throw scope.kind === "shops" ? refused() : notFound(`Shop ${q.shop}`);
    res.json(body);
  });

  return router;
}
