import { Router, type Request } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import { winterReadinessRoles } from "../../shared/schemas/fitting-list.js";
import { winterForecastQuerySchema, winterStockInputSchema, type WinterStock } from "../../shared/schemas/winter.js";
import { scopeIncludes } from "../db/queries/scope.js";
import { addDays } from "../analytics/winter-forecast.js";
import { coldStartParts, dataEnd, listWinterStock, setWinterStock, shopExists } from "../db/queries/winter.js";
import { AnswerCache } from "../services/answer-cache.js";
import { winterBacktest, winterForecast } from "../services/winter/winter-service.js";

const today = () => new Date().toISOString().slice(0, 10);

/**
 * /api/winter: the cold-start parts forecast with stock advice (GET /forecast), its backtest on the last complete
 * winter (GET /backtest), and stock on hand per shop and part number (GET and PUT /stock). Roles are checked per
 * route, so the fitting list mounted under /winter/fitting keeps its own.
 */
export function winterRoutes(db: Db): Router {
  const router = Router();
  const guard = allow(...winterReadinessRoles);
  // The forecast and backtest change only when the warehouse does (the forecast also with the day, for "order now");
  // stock counts are read fresh on every forecast, so the forecast is never cached.
  const answers = new AnswerCache(db, 50);

  router.get("/forecast", guard, async (req, res) => {
    const q = winterForecastQuerySchema.parse(req.query);
    res.json(await winterForecast(db, requireScope(req), q, today()));
  });

  router.get("/backtest", guard, async (req, res) => {
    const scope = requireScope(req);
    await answers.send(req, res, scope, () => winterBacktest(db, scope));
  });

  const stock = async (req: Request): Promise<WinterStock> => ({ rows: await listWinterStock(db, requireScope(req)) });

  router.get("/stock", guard, async (req, res) => {
    res.json(await stock(req));
  });

  router.put("/stock", guard, async (req, res) => {
    const me = requireUser(req);
    const scope = requireScope(req);
    const parsed = winterStockInputSchema.safeParse(req.body);
    if (!parsed.success) {
      const words = [...new Set(parsed.error.issues.map((i) => i.message))].join("; ");
      throw new HttpError(400, "validation_failed", `The stock count was not saved: ${words}.`, parsed.error.issues);
    }
    const input = { ...parsed.data, shopCode: parsed.data.shopCode.toUpperCase() };
    // scope first, in words that do not name the shop: a manager learns nothing of shops outside their own
    if (!scopeIncludes(scope, input.shopCode)) throw new HttpError(403, "forbidden", "The stock count was not saved: that shop is not one of yours.");
    if (!(await shopExists(db, input.shopCode))) throw new HttpError(400, "unknown_shop", `The stock count was not saved: there is no shop ${input.shopCode}.`);
    const end = await dataEnd(db);
    const known = end ? (await coldStartParts(db, addDays(end, 1))).map((p) => p.partNumber) : [];
    if (!known.includes(input.partNumber)) {
      throw new HttpError(
        400,
        "unknown_part",
        `The stock count was not saved: ${input.partNumber} is not a cold-start part number in the data${known.length ? ` (known: ${known.join(", ")})` : ""}.`,
      );
    }
    await setWinterStock(db, scope, input, { sub: me.sub, name: me.name });
    res.json(await stock(req));
  });

  return router;
}
