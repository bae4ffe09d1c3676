/**
 * The repairs API: a page of the list (by cursor, or by number near the top), one line in full, and the
 * CSV of a whole filter. Cursors are written and checked here; the SQL is in db/queries/repairs.
 */
import { Router, type Request } from "express";
import type pg from "pg";
import { pipeline } from "node:stream/promises";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { repairCursorSchema, repairListQuerySchema, type RepairCursor, type RepairList, type RepairListQuery } from "../../shared/schemas/repairs.js";
import { getRepair, isListPosition, listRepairPage, type ListStart, type RepairFilter } from "../db/queries/repairs.js";
import { analyticsRoles } from "../../shared/roles.js";
import { openRepairCsv } from "../db/queries/repairs-csv.js";

function parse(req: Request) {
  const filters = analyticsFiltersSchema.parse(req.query);
  const list = repairListQuerySchema.parse(req.query);
  const filter: RepairFilter = { filters, list: { q: list.q, lineType: list.lineType, payType: list.payType } };
  return { filter, list };
}

/** A cursor is base64url of its JSON: opaque to the page, checked field by field when it comes back. */
const writeCursor = (c: RepairCursor) => Buffer.from(JSON.stringify(c)).toString("base64url");

function readCursor(text: string, list: RepairListQuery): RepairCursor {
  let decoded: unknown;
  try {
    decoded = JSON.parse(Buffer.from(text, "base64url").toString("utf8"));
  } catch {
    decoded = undefined;
  }
  const parsed = repairCursorSchema.safeParse(decoded);
  if (!parsed.success || !isListPosition(parsed.data.sort, parsed.data.dir, parsed.data.values)) {
    throw new HttpError(400, "invalid_cursor", "The cursor is not one this list handed out (it may have been cut short or changed). Ask for the list without a cursor to start at the first page.");
  }
  if (parsed.data.sort !== list.sort || parsed.data.dir !== list.dir) {
    throw new HttpError(400, "invalid_cursor", `The cursor belongs to the list sorted by ${parsed.data.sort} (${parsed.data.dir}), not by ${list.sort} (${list.dir}). Ask without a cursor to start at the first page of this sort.`);
  }
  return parsed.data;
}

/** GET /api/repairs (a page, by cursor or by number) and GET /api/repairs/:id (one line in full). */
export function repairRoutes(db: Db): Router {
  const router = Router();
  router.use(allow(...analyticsRoles));

  router.get("/", async (req, res) => {
    const { filter, list } = parse(req);
    const cursor = list.cursor === undefined ? null : readCursor(list.cursor, list);
    const start: ListStart = cursor ? { toward: cursor.toward, values: cursor.values } : { offset: (list.page - 1) * list.pageSize };
    const found = await listRepairPage(db, requireScope(req), filter, list, start, cursor ?? undefined);
    const back = cursor?.toward === "before";
    // read backwards, `more` is about the rows above; a page read back to the top is page 1
    const page = back && !found.more ? 1 : (cursor?.page ?? list.page);
    const hasNext = back || found.more;
    const hasPrev = back ? found.more : page > 1;
    // the last page reached by number tells the total exactly
    const total = !hasNext && "offset" in start ? { total: start.offset + found.rows.length, totalIsEstimate: false } : { total: found.total, totalIsEstimate: found.totalIsEstimate };
    const to = (toward: RepairCursor["toward"], values: string[] | null, at: number) =>
      values ? writeCursor({ sort: list.sort, dir: list.dir, toward, page: Math.max(1, at), values, ...total }) : null;
    const body: RepairList = {
      ...total,
      page,
      pageSize: list.pageSize,
      rows: found.rows,
      nextCursor: hasNext ? to("after", found.last, page + 1) : null,
      prevCursor: hasPrev ? to("before", found.first, page - 1) : null,
    };
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

/**
 * GET /api/repairs.csv: every line the same filter matches, in list order, from one snapshot, written by
 * PostgreSQL (db/queries/repairs-csv) and sent as fast as the client takes it (the pipeline's backpressure
 * reaches the COPY). A client that leaves ends the COPY and frees its connection.
 */
export function repairCsvRoutes(db: Db, pool: pg.Pool): Router {
  const router = Router();
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const { filter, list } = parse(req);
    const csv = await openRepairCsv(db, pool, requireScope(req), filter, list);
    res.setHeader("content-type", "text/csv; charset=utf-8");
    res.attachment("repair-lines.csv");
    try {
      await pipeline(csv, res);
    } catch (err) {
      // the pipeline has destroyed the response: the download ends short rather than look complete
      if ((err as NodeJS.ErrnoException).code === "ERR_STREAM_PREMATURE_CLOSE") req.log?.info("the client left before the end of the repair CSV");
      else req.log?.error({ err }, "repair CSV export ended early");
    }
  });
  return router;
}
