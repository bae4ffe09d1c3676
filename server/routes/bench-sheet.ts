import { Router } from "express";
import type pg from "pg";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { searchOpenLines } from "../db/queries/bench-sheet.js";
import { notFound } from "../errors.js";
import { benchSheetReadRoles, benchSheetWriteRoles } from "../../shared/roles.js";
import {
  BENCH_OPEN_DAYS, benchCreateLineSchema, benchSearchQuerySchema, benchSheetSchema, type BenchSearchResponse,
} from "../../shared/schemas/bench-sheet.js";
import { createLine, lineDetail, parseLineId, saveSheet } from "../services/bench-sheet/service.js";

const utcToday = () => new Date().toISOString().slice(0, 10);

/**
 * The bench sheet a technician fills in at the machine. GET /lines?q= finds open lines of the caller's shops by
 * RO number or serial; POST /lines adds a line the shop has not exported yet; GET /lines/:id gives a line with
 * its readings; PUT /lines/:id/sheet saves a sheet through the ETL's loader (all of it, or nothing and every
 * refused value in words). Technicians and managers work their own shops; analysts and admins may read.
 */
export function benchSheetRoutes(deps: { db: Db; pool: pg.Pool }): Router {
  const router = Router();
  router.use(allow(...benchSheetReadRoles));

  const refOf = (raw: string) => {
    const ref = parseLineId(raw);
    if (!ref) throw notFound("That repair-order line");
    return ref;
  };

  router.get("/lines", async (req, res) => {
    const { q } = benchSearchQuerySchema.parse(req.query);
    const body: BenchSearchResponse = { lines: await searchOpenLines(deps.db, requireScope(req), q, utcToday()), openDays: BENCH_OPEN_DAYS };
    res.json(body);
  });

  router.post("/lines", allow(...benchSheetWriteRoles), async (req, res) => {
    const input = benchCreateLineSchema.parse(req.body ?? {});
    const u = requireUser(req);
    res.status(201).json(await createLine(deps, requireScope(req), u.name || u.email || u.sub, input));
  });

  router.get("/lines/:id", async (req, res) => {
    res.json(await lineDetail(deps, requireScope(req), refOf(String(req.params.id))));
  });

  router.put("/lines/:id/sheet", allow(...benchSheetWriteRoles), async (req, res) => {
    const ref = refOf(String(req.params.id));
    const sheet = benchSheetSchema.parse(req.body ?? {});
    const u = requireUser(req);
    res.json(await saveSheet(deps, requireScope(req), u.name || u.email || u.sub, ref, sheet));
  });

  return router;
}
