/**
 * The repairs API: a page of the list (by cursor, or by number near the top), one line in full, and the
 * CSV of a whole filter. Cursors are written and checked here; the SQL is in db/queries/repairs.
 */
import { Router, type Request } from "express";
import { stringify, type Options } from "csv-stringify/sync";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import {
  repairCsvColumns, repairCursorSchema, repairListQuerySchema, type RepairCursor, type RepairList, type RepairListQuery, type RepairRow,
} from "../../shared/schemas/repairs.js";
import { eachRepairBatch, getRepair, isListPosition, listRepairPage, type ListStart, type RepairFilter } from "../db/queries/repairs.js";
import { analyticsRoles } from "../../shared/roles.js";
import { neutraliseCell } from "../../shared/csv-cell.js";

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

const csvOptions: Options = { bom: false, record_delimiter: "windows", cast: { string: neutraliseCell, number: (n) => String(n) } };

/**
 * The CSV text of each batch of rows (csv-stringify), the header first: one write per batch. Rows go to the
 * stringifier as arrays in column order, which it writes without looking each column up by name.
 */
async function* csvText(batches: AsyncIterable<RepairRow[]>): AsyncGenerator<string> {
  yield stringify([repairCsvColumns.map((c) => c.label)], csvOptions);
  for await (const rows of batches) yield stringify(rows.map((r) => repairCsvColumns.map((c) => r[c.key])), csvOptions);
}

/**
 * GET /api/repairs.csv: every line the same filter matches, in list order, streamed from one snapshot;
 * batches are read only as fast as the client takes the file (the pipeline's backpressure).
 */
export function repairCsvRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const { filter, list } = parse(req);
    res.setHeader("content-type", "text/csv; charset=utf-8");
    res.attachment("repair-lines.csv");
    try {
      await pipeline(Readable.from(csvText(eachRepairBatch(db, requireScope(req), filter, list))), res);
    } catch (err) {
      // the pipeline has destroyed the response: the download ends short rather than look complete
      req.log?.error({ err }, "repair CSV export ended early");
    }
  });
  return router;
}
