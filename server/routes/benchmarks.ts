/**
 * /api/benchmarks: shop benchmarks, funnel, trend and the comeback pairs behind a figure, computed by the
 * benchmarks service. Parses the query, checks role and scope, and answers.
 */
import { createHash } from "node:crypto";
import { Router, type Request, type Response } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { scopeIncludes } from "../db/queries/scope.js";
import { forbidden, notFound } from "../errors.js";
import { benchmarkService } from "../services/benchmarks/service.js";
import { AnswerCache } from "../services/answer-cache.js";
import { warrantyClaimCounts } from "../db/queries/benchmarks.js";
import { todayIso } from "../../shared/dates.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { benchmarkQuerySchema, comebackPairsQuerySchema, trendQuerySchema } from "../../shared/schemas/benchmarks.js";
import { benchmarkLinesQuerySchema } from "../../shared/schemas/benchmark-details.js";
import { benchmarkLinesCsv } from "../services/benchmarks/details.js";

const BENCHMARK_ROLES = ["director", "analyst", "manager", "admin"] as const;

export function benchmarkRoutes(db: Db): Router {
  const router = Router();
  const benchmarks = benchmarkService(db);
  router.use(allow(...BENCHMARK_ROLES));

  // answers change with the data, the day (claims fall due) and the claims filed: all three are in the key
  const answers = new AnswerCache(db, 50);
  const answer = async (req: Request, res: Response, compute: (scope: ShopScope) => Promise<unknown>) => {
    const scope = requireScope(req);
    const today = todayIso();
    const claims = createHash("sha256").update(JSON.stringify(await warrantyClaimCounts(db, today))).digest("base64url");
    await (await answers.answer([req.path, scope, req.query, today, claims], () => compute(scope))).send(req, res);
  };

  router.get("/shops", (req, res) => answer(req, res, (scope) => benchmarks.shops(scope, benchmarkQuerySchema.parse(req.query))));
  router.get("/funnel", (req, res) => answer(req, res, (scope) => benchmarks.funnel(scope, benchmarkQuerySchema.parse(req.query))));
  router.get("/trend", (req, res) => answer(req, res, (scope) => benchmarks.trend(scope, trendQuerySchema.parse(req.query))));

  router.get("/waits", (req, res) => answer(req, res, (scope) => benchmarks.waits(scope, benchmarkQuerySchema.parse(req.query))));
  router.get("/fix-cycle", (req, res) => answer(req, res, (scope) => benchmarks.fixCycle(scope, benchmarkQuerySchema.parse(req.query))));

  // the lines behind one KPI of one shop, as JSON or CSV: a caller limited to some shops is refused another's
  const kpiLines = async (req: Request) => {
    const scope = requireScope(req);
    const q = benchmarkLinesQuerySchema.parse(req.query);
    const refused = () => forbidden("the lines of a shop outside your scope");
    if (!scopeIncludes(scope, q.shop)) throw refused();
    const body = await benchmarks.lines(scope, q);
    if (!body) throw scope.kind === "shops" ? refused() : notFound(`Shop ${q.shop}`);
    return body;
  };
  router.get("/lines", async (req, res) => {
    res.json(await kpiLines(req));
  });
  router.get("/lines.csv", async (req, res) => {
    const body = await kpiLines(req);
    res.attachment(`${body.kpi}-${body.shop.code}-${body.period.key}.csv`).type("text/csv; charset=utf-8").send(benchmarkLinesCsv(body));
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
