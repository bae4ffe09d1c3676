import { Router, type Request } from "express";
import { stringify } from "csv-stringify";
import { once } from "node:events";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { repairCsvColumns, repairListQuerySchema, type RepairList } from "../../shared/schemas/repairs.js";
import { eachRepairBatch, getRepair, listRepairs, type RepairFilter } from "../db/queries/repairs.js";
import { analyticsRoles } from "../../shared/roles.js";
import { neutraliseCell } from "../../shared/csv-cell.js";

function parse(req: Request) {
  const filters = analyticsFiltersSchema.parse(req.query);
  const list = repairListQuerySchema.parse(req.query);
  const filter: RepairFilter = { filters, list: { q: list.q, lineType: list.lineType, payType: list.payType } };
  return { filter, list };
}

/** GET /api/repairs (a page) and GET /api/repairs/:id (one line in full). */
export function repairRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...analyticsRoles));

  router.get("/", async (req, res) => {
    const { filter, list } = parse(req);
    const { total, rows } = await listRepairs(db, requireScope(req), filter, list);
    const body: RepairList = { total, page: list.page, pageSize: list.pageSize, rows };
    res.json(body);
  });

  router.get("/:id", async (req, res) => {
    const detail = await getRepair(db, requireScope(req), req.params.id);
    if (!detail) {
      throw new HttpError(404, "repair_not_found", `There is no repair line ${req.params.id} among the shops you can see.`);
    }
    res.json(detail);
  });
  return router;
}

/** GET /api/repairs.csv: every line the same filter matches, in list order, streamed. */
export function repairCsvRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const { filter, list } = parse(req);
    const csv = stringify({
      header: true,
      bom: false,
      record_delimiter: "windows",
      columns: repairCsvColumns.map((c) => ({ key: c.key, header: c.label })),
      cast: { string: neutraliseCell, number: (n) => String(n) },
    });
    res.setHeader("content-type", "text/csv; charset=utf-8");
    res.attachment("repair-lines.csv");
    csv.pipe(res);
    try {
      await eachRepairBatch(db, requireScope(req), filter, list, async (rows) => {
        for (const r of rows) {
          if (!csv.write(r)) await once(csv, "drain");
        }
      });
      csv.end();
    } catch (err) {
      // headers are gone: cut the download short rather than send a truncated file that looks complete
      csv.destroy();
      res.destroy(err as Error);
      req.log?.error({ err }, "repair CSV export failed");
    }
  });
  return router;
}
