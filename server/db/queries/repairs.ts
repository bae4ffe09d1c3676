/**
 * Repair lines: one line in full, and the list behind the repairs page and its CSV. The list is read by
 * keyset: every sort is a tuple of columns in one direction ending in the unique repair_line_key, matched by
 * an index (migration 0042), and a page starts after (or before) the sort values of a row instead of counting
 * rows off. Totals are counted only while that is cheap; past that they are PostgreSQL's estimate.
 */
import { isInt64 } from "../../../shared/int64.js";
import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import { repairCsvColumns, type RepairDetail, type RepairListQuery, type RepairRow, type RepairSortKey } from "../../../shared/schemas/repairs.js";
import { scopedShopCodes, scopeIncludes } from "./scope.js";
import { hourBandSql, inTemperatureBandsSql, storageBandSql } from "../../../shared/band-sql.js";

/** What a repair-line listing is filtered by: the shared analytics filters, the list's own parameters, optional ids. */
export interface RepairFilter {
  filters: AnalyticsFilters;
  list: Partial<Pick<RepairListQuery, "q" | "lineType" | "payType">>;
  /** restrict to these repair_line_keys (e.g. a cluster's lines) */
  ids?: readonly string[];
}

type Dir = "asc" | "desc";
/** The tables of the list's join by alias: repair line, shop, machine, component, weather. */
type Alias = "fl" | "s" | "m" | "c" | "w";
/** One WHERE condition and the tables it reads. */
interface Condition {
  sql: RawBuilder<unknown>;
  reads: readonly Alias[];
}

const emptyFilters: AnalyticsFilters = {
  shops: [], engineFamilies: [], modelLines: [], components: [], lots: [], tempBands: [], hourBands: [], unit: "C",
};

const inList = (col: RawBuilder<unknown>, values: readonly string[]) => sql`${col} IN (${sql.join(values.map((v) => sql`${v}`))})`;
const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * WHERE conditions over fact_repair_line fl, dim_shop s (the shop that did the repair), dim_machine m,
 * dim_component c and fact_weather_day w (that shop's weather on the day the order opened). The caller's
 * scope applies to the repairing shop: a manager sees the lines their shops wrote.
 */
function conditionList(scope: ShopScope, r: RepairFilter): Condition[] {
  const f = r.filters;
  const parts: Condition[] = [];
  const on = (reads: readonly Alias[], cond: RawBuilder<unknown>) => parts.push({ sql: cond, reads });
  const scoped = scopedShopCodes(scope);
  if (scoped) on(["s"], scoped.length ? inList(sql.ref("s.shop_code"), scoped) : sql`FALSE`);
  if (r.ids) on(["fl"], r.ids.length ? sql`fl.repair_line_key IN (${sql.join(r.ids.map((id) => sql`${id}::bigint`))})` : sql`FALSE`);
  if (f.from) on(["fl"], sql`fl.opened_date >= ${f.from}::date`);
  if (f.to) on(["fl"], sql`fl.opened_date <= ${f.to}::date`);
  if (f.shops.length) on(["s"], inList(sql.ref("s.shop_code"), f.shops.map((s) => s.toUpperCase())));
  if (f.engineFamilies.length) on(["m"], inList(sql.ref("m.engine_family"), f.engineFamilies));
  if (f.modelLines.length) on(["m"], inList(sql.ref("m.model_line"), f.modelLines));
  if (f.components.length) on(["c"], inList(sql.ref("c.component_code"), f.components));
  if (f.lots.length) on(["m", "fl"], sql`(${inList(sql.ref("m.heater_plug_lot"), f.lots)} OR ${inList(sql.ref("fl.supplier_lot"), f.lots)})`);
  const build = sql`date_trunc('month', coalesce(m.build_date, m.delivery_date))::date`;
  if (f.buildFrom) on(["m"], sql`${build} >= ${`${f.buildFrom}-01`}::date`);
  if (f.buildTo) on(["m"], sql`${build} <= ${`${f.buildTo}-01`}::date`);
  if (f.tempBands.length) on(["w"], inTemperatureBandsSql(storageBandSql(sql`w.tmin_c`), f.tempBands));
  if (f.hourBands.length) on(["fl"], inList(hourBandSql(sql`fl.hour_meter`), f.hourBands));
  if (r.list.lineType) on(["fl"], sql`fl.line_type = ${r.list.lineType}`);
  if (r.list.payType) on(["fl"], sql`fl.pay_type = ${r.list.payType}`);
  if (r.list.q) {
    const like = `%${likeEscape(r.list.q)}%`;
    on(["fl", "m", "c"], sql`(fl.ro_number ILIKE ${like} OR m.serial ILIKE ${like} OR fl.complaint ILIKE ${like} OR fl.cause ILIKE ${like}
      OR fl.correction ILIKE ${like} OR fl.part_number ILIKE ${like} OR fl.supplier_lot ILIKE ${like} OR c.name ILIKE ${like})`);
  }
  return parts;
}

const allOf = (parts: readonly Condition[]) => (parts.length ? sql.join(parts.map((p) => p.sql), sql` AND `) : sql`TRUE`);
const conditions = (scope: ShopScope, r: RepairFilter) => allOf(conditionList(scope, r));

const FROM = sql`
  FROM fact_repair_line fl
  JOIN dim_shop s ON s.shop_key = fl.shop_key
  JOIN dim_machine m ON m.machine_key = fl.machine_key
  JOIN dim_component c ON c.component_key = fl.component_key
  LEFT JOIN dim_technician t ON t.technician_key = fl.technician_key
  LEFT JOIN fact_weather_day w ON w.shop_key = fl.shop_key AND w.date = fl.opened_date`;

const SELECT = sql`
  SELECT fl.repair_line_key::text AS id, s.shop_code, fl.ro_number, fl.line_no, fl.opened_date, fl.closed_date, m.serial,
         m.model_line, m.engine_family, c.component_code, c.name AS component_name, fl.line_type, fl.pay_type,
         fl.hour_meter, fl.labor_hours, fl.standard_hours, fl.complaint, fl.cause, fl.part_number, fl.supplier_lot,
         t.tech_id AS technician`;

/** The type of one sort value, which says how a cursor's copy of it is checked and cast back. */
type ValueKind = "date" | "numeric" | "text" | "int" | "bigint";
interface OrderKey {
  expr: RawBuilder<unknown>;
  kind: ValueKind;
}
const orderKey = (expr: RawBuilder<unknown>, kind: ValueKind): OrderKey => ({ expr, kind });

/**
 * A list order: keys all sorted one way, the last one unique. A sort on a repair-line column has an index on
 * its keys (migration 0042). A sort on a shop, machine or component column is led by groups: it walks those
 * rows in order and reads each one's lines through the fact index that starts with the group's key, so its
 * first keys are the group's and the rest are WITHIN_GROUP.
 */
interface ListOrder {
  keys: OrderKey[];
  groups?: {
    /** the rows naming the groups, under the alias the list's conditions use for them */
    source: RawBuilder<unknown>;
    reads: Alias;
    /** the leading keys of the order as the source names them */
    keys: RawBuilder<unknown>[];
    /** a group's id in the source and the fact column that holds it */
    id: RawBuilder<unknown>;
    factColumn: RawBuilder<unknown>;
  };
}

const OPENED = orderKey(sql`fl.opened_date`, "date");
const RO_LINE_ID = [orderKey(sql`fl.ro_number`, "text"), orderKey(sql`fl.line_no`, "int"), orderKey(sql`fl.repair_line_key`, "bigint")];
const WITHIN_GROUP = [OPENED, ...RO_LINE_ID];

/** A nullable column sorted with its empty cells last either way (as the index expressions of 0042 write it). */
function nullsLast(column: RawBuilder<unknown>, kind: "date" | "numeric", dir: Dir): OrderKey {
  const sentinel = { date: { asc: sql`'infinity'::date`, desc: sql`'-infinity'::date` }, numeric: { asc: sql`'Infinity'::numeric`, desc: sql`'-Infinity'::numeric` } }[kind][dir];
  return orderKey(sql`coalesce(${column}, ${sentinel})`, kind);
}

/** Machines in the order of one of their columns (serial is unique; the others are followed by the machine's key). */
const machineGroups = (column: "serial" | "model_line" | "engine_family"): ListOrder => {
  const byColumn = column === "serial" ? [sql.ref(`m.${column}`)] : [sql.ref(`m.${column}`), sql`m.machine_key`];
  return {
    keys: [...byColumn.map((e, i) => orderKey(e, i ? "bigint" : "text")), ...WITHIN_GROUP],
    groups: { source: sql`dim_machine m`, reads: "m", keys: byColumn, id: sql`m.machine_key`, factColumn: sql`fl.machine_key` },
  };
};

/** The order of a sort; `dir` only matters where it decides which end empty cells sort to. */
function listOrder(sort: RepairSortKey, dir: Dir): ListOrder {
  switch (sort) {
    case "opened": return { keys: [OPENED, ...RO_LINE_ID] };
    case "ro": return { keys: RO_LINE_ID };
    case "closed": return { keys: [nullsLast(sql`fl.closed_date`, "date", dir), ...RO_LINE_ID] };
    case "hours": return { keys: [nullsLast(sql`fl.hour_meter`, "numeric", dir), ...RO_LINE_ID] };
    case "laborHours": return { keys: [nullsLast(sql`fl.labor_hours`, "numeric", dir), ...RO_LINE_ID] };
    case "payType": return { keys: [orderKey(sql`fl.pay_type`, "text"), ...WITHIN_GROUP] };
    case "lineType": return { keys: [orderKey(sql`fl.line_type`, "text"), ...WITHIN_GROUP] };
    case "serial": return machineGroups("serial");
    case "model": return machineGroups("model_line");
    case "engineFamily": return machineGroups("engine_family");
    case "shop":
      return {
        keys: [orderKey(sql`s.shop_code`, "text"), ...WITHIN_GROUP],
        groups: { source: sql`dim_shop s`, reads: "s", keys: [sql`s.shop_code`], id: sql`s.shop_key`, factColumn: sql`fl.shop_key` },
      };
    case "component":
      return {
        keys: [orderKey(sql`c.name`, "text"), orderKey(sql`c.component_key`, "bigint"), ...WITHIN_GROUP],
        groups: { source: sql`dim_component c`, reads: "c", keys: [sql`c.name`, sql`c.component_key`], id: sql`c.component_key`, factColumn: sql`fl.component_key` },
      };
  }
}

const castValue = (v: string, kind: ValueKind) =>
  kind === "text" ? sql`${v}::text` : sql`${v}::${sql.raw(kind === "int" ? "integer" : kind)}`;
const tuple = (exprs: readonly RawBuilder<unknown>[]) => sql`(${sql.join(exprs)})`;
const valuesOf = (keys: readonly OrderKey[], values: readonly string[]) => tuple(keys.map((k, i) => castValue(values[i], k.kind)));
const sorted = (exprs: readonly RawBuilder<unknown>[], dir: Dir) => sql.join(exprs.map((e) => sql`${e} ${sql.raw(dir === "asc" ? "ASC" : "DESC")}`));
/** The sort values of a row as text, k0…kn: what a cursor carries. */
const positionColumns = (exprs: readonly RawBuilder<unknown>[]) => sql.join(exprs.map((e, i) => sql`${e}::text AS ${sql.ref(`k${i}`)}`));

/** What PostgreSQL accepts for each kind of sort value (a cursor that fails one is refused before any SQL). */
const CHECKS: Record<ValueKind, (v: string) => boolean> = {
  date: (v) => /^-?infinity$/.test(v) || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !v.startsWith("0000") && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v)),
  numeric: (v) => /^-?(\d{1,15}(\.\d{1,6})?|Infinity)$/.test(v),
  text: (v) => !v.includes("\u0000"),
  int: (v) => /^-?\d{1,10}$/.test(v) && Math.abs(Number(v)) <= 2 ** 31 - 1,
  bigint: (v) => /^-?\d{1,19}$/.test(v) && BigInt(v) >= -(2n ** 63n) && BigInt(v) < 2n ** 63n,
};

/** True when `values` could be the sort values of a row in this order (one per key, each of its key's type). */
export function isListPosition(sort: RepairSortKey, dir: Dir, values: readonly string[]): boolean {
  const { keys } = listOrder(sort, dir);
  return values.length === keys.length && keys.every((k, i) => CHECKS[k.kind](values[i]));
}

interface RowRecord {
  id: string; shop_code: string; ro_number: string; line_no: number; opened_date: string; closed_date: string | null; serial: string;
  model_line: string; engine_family: string; component_code: string; component_name: string; line_type: string; pay_type: string;
  hour_meter: string | null; labor_hours: string | null; standard_hours: string | null; complaint: string | null; cause: string | null;
  part_number: string | null; supplier_lot: string | null; technician: string | null;
}
type PositionedRecord = RowRecord & Record<`k${number}`, string>;

const num = (v: string | number | null | undefined): number | null => (v === null || v === undefined ? null : Number(v));

function toRow(r: RowRecord): RepairRow {
  return {
    id: r.id,
    shopCode: r.shop_code,
    roNumber: r.ro_number,
    lineNo: r.line_no,
    openedDate: r.opened_date,
    closedDate: r.closed_date,
    serial: r.serial,
    modelLine: r.model_line,
    engineFamily: r.engine_family,
    componentCode: r.component_code,
    componentName: r.component_name,
    lineType: r.line_type,
    payType: r.pay_type,
    hourMeter: num(r.hour_meter),
    laborHours: num(r.labor_hours),
    standardHours: num(r.standard_hours),
    complaint: r.complaint,
    cause: r.cause,
    partNumber: r.part_number,
    supplierLot: r.supplier_lot,
    technician: r.technician,
  };
}

/** All the lines (exact total) of a short, known set, one page in list order; for lists that are not paged further. */
export async function listRepairs(
  db: Db,
  scope: ShopScope,
  r: RepairFilter,
  page: Pick<RepairListQuery, "page" | "pageSize" | "sort" | "dir">,
): Promise<{ total: number; rows: RepairRow[] }> {
  const where = conditions(scope, r);
  const { keys } = listOrder(page.sort, page.dir);
  const [count, rows] = await Promise.all([
    sql<{ n: string }>`SELECT count(*) AS n ${FROM} WHERE ${where}`.execute(db),
    sql<RowRecord>`${SELECT} ${FROM} WHERE ${where} ORDER BY ${sorted(keys.map((k) => k.expr), page.dir)}
      LIMIT ${page.pageSize} OFFSET ${(page.page - 1) * page.pageSize}`.execute(db),
  ]);
  return { total: Number(count.rows[0]?.n ?? 0), rows: rows.rows.map(toRow) };
}

/** Where a page of the list starts: after or before a row's sort values, or a number of rows from the top. */
export type ListStart = { toward: "after" | "before"; values: readonly string[] } | { offset: number };

/** A page of the list with the sort values of its first and last rows, and whether rows lie beyond it. */
export interface ListPage extends ListTotal {
  rows: RepairRow[];
  first: string[] | null;
  last: string[] | null;
  /** rows lie beyond the page in the direction it was read (below it, or above it when read `before`) */
  more: boolean;
}

/** Up to this many lines a page is cut from all of them, sorted; past it, the order's index is walked. */
const NARROW_LIMIT = 10_000;

/** How one page is read: in which direction from which start, and how many rows. */
interface PageRead {
  order: ListOrder;
  reading: Dir;
  after: readonly string[] | null;
  offset: number;
  limit: number;
}

/** The lines a filter matches: exact, or PostgreSQL's estimate. */
export interface ListTotal {
  total: number;
  totalIsEstimate: boolean;
}

/**
 * One page of the list in the order `sort`/`dir`, read from `start`, and the total (counted unless `known`,
 * as a cursor carries it from the first page). A filter that matches few lines has them all sorted; a broad
 * one walks the order's index, so a page costs the same at any depth. A page `before` a row is read
 * backwards and turned round. One row beyond the page is read, to know whether there is more.
 */
export async function listRepairPage(
  db: Db,
  scope: ShopScope,
  r: RepairFilter,
  page: Pick<RepairListQuery, "pageSize" | "sort" | "dir">,
  start: ListStart,
  known?: ListTotal,
): Promise<ListPage> {
  const read: PageRead = {
    order: listOrder(page.sort, page.dir),
    reading: "toward" in start && start.toward === "before" ? (page.dir === "asc" ? "desc" : "asc") : page.dir,
    after: "values" in start ? start.values : null,
    offset: "offset" in start ? start.offset : 0,
    limit: page.pageSize + 1,
  };
  const parts = conditionList(scope, r);
  const count = known ?? (await countRepairs(db, parts));
  const narrow = !count.totalIsEstimate && count.total <= NARROW_LIMIT;
  const query = narrow || !read.order.groups ? keysetPage(read, allOf(parts), narrow) : groupedPage(read, parts);
  const found = (await query.execute(db)).rows;
  const records = found.slice(0, page.pageSize);
  if (read.reading !== page.dir) records.reverse();
  const position = (rec: PositionedRecord | undefined) => (rec ? read.order.keys.map((_, i) => rec[`k${i}`]) : null);
  return {
    rows: records.map(toRow),
    first: position(records[0]),
    last: position(records.at(-1)),
    more: found.length > page.pageSize,
    ...count,
  };
}

/**
 * A page by one row comparison on the order's keys. Broad: the comparison is an index condition on the
 * order's own index. Narrow: the matching lines are gathered first (MATERIALIZED keeps the planner from
 * walking an index past millions of lines that do not match) and sorted.
 */
function keysetPage({ order, reading, after, offset, limit }: PageRead, where: RawBuilder<unknown>, narrow: boolean) {
  const exprs = order.keys.map((k) => k.expr);
  const keys = narrow ? order.keys.map((_, i) => sql.ref(`hits.o${i}`)) : exprs;
  const keyset = after ? sql`AND ${tuple(keys)} ${sql.raw(reading === "asc" ? ">" : "<")} ${valuesOf(order.keys, after)}` : sql``;
  const tail = sql`${keyset} ORDER BY ${sorted(keys, reading)} LIMIT ${limit} OFFSET ${offset}`;
  if (!narrow) return sql<PositionedRecord>`${SELECT}, ${positionColumns(exprs)} ${FROM} WHERE ${where} ${tail}`;
  return sql<PositionedRecord>`
    WITH hits AS MATERIALIZED (
      ${SELECT}, ${positionColumns(exprs)}, ${sql.join(exprs.map((e, i) => sql`${e} AS ${sql.ref(`o${i}`)}`))} ${FROM} WHERE ${where}
    )
    SELECT * FROM hits WHERE TRUE ${tail}`;
}

/**
 * A page of an order led by groups: the groups in order (from the cursor's group on), and for each, through
 * the fact index (group key, opened_date), its first `offset + limit` lines; the cursor's own group starts at
 * the cursor's opened_date (the other groups at ∓infinity), so no group is read from its start to find it.
 */
function groupedPage({ order, reading, after, offset, limit }: PageRead, parts: readonly Condition[]) {
  const g = order.groups!;
  const lead = order.keys.slice(0, g.keys.length);
  const within = order.keys.slice(g.keys.length).map((k) => k.expr);
  const cmp = sql.raw(reading === "asc" ? ">" : "<");
  const groupNames = g.keys.map((_, i) => sql.ref(`grp.g${i}`));
  const groupCond = after ? sql`AND ${tuple(g.keys)} ${sql.raw(reading === "asc" ? ">=" : "<=")} ${valuesOf(lead, after)}` : sql``;
  const startCol = after
    ? sql`, CASE WHEN ${tuple(g.keys)} = ${valuesOf(lead, after)} THEN ${after[lead.length]}::date ELSE ${reading === "asc" ? "-infinity" : "infinity"}::date END AS start`
    : sql``;
  const rest = after ? order.keys.slice(lead.length + 1) : [];
  const withinCond = after
    ? sql`AND ${tuple(within)} ${cmp} (grp.start, ${sql.join(rest.map((k, i) => castValue(after[lead.length + 1 + i], k.kind)))})`
    : sql``;
  return sql<PositionedRecord>`
    SELECT x.* FROM (
      SELECT ${sql.join(g.keys.map((e, i) => sql`${e} AS ${sql.ref(`g${i}`)}`))}, ${g.id} AS gid ${startCol}
      FROM ${g.source} WHERE ${allOf(parts.filter((p) => p.reads.length === 1 && p.reads[0] === g.reads))} ${groupCond}
    ) grp CROSS JOIN LATERAL (
      ${SELECT}, ${positionColumns([...groupNames, ...within])}, ${sql.join(within.map((e, i) => sql`${e} AS ${sql.ref(`w${i}`)}`))}
      ${FROM} WHERE ${g.factColumn} = grp.gid AND ${allOf(parts)} ${withinCond}
      ORDER BY ${sorted(within, reading)} LIMIT ${offset + limit}
    ) x
    ORDER BY ${sorted([...groupNames, ...within.map((_, i) => sql.ref(`x.w${i}`))], reading)} LIMIT ${limit} OFFSET ${offset}`;
}

/** Above this many lines a total is estimated; up to it, lines are counted (the count stops one past it). */
const EXACT_TOTAL_LIMIT = 50_000;

/** The tables a count needs: the repair lines and the dimensions its conditions read (the loader keeps every line's dimension rows). */
function countFrom(parts: readonly Condition[]) {
  const reads = new Set(parts.flatMap((p) => p.reads));
  return sql`FROM fact_repair_line fl
    ${reads.has("s") ? sql`JOIN dim_shop s ON s.shop_key = fl.shop_key` : sql``}
    ${reads.has("m") ? sql`JOIN dim_machine m ON m.machine_key = fl.machine_key` : sql``}
    ${reads.has("c") ? sql`JOIN dim_component c ON c.component_key = fl.component_key` : sql``}
    ${reads.has("w") ? sql`LEFT JOIN fact_weather_day w ON w.shop_key = fl.shop_key AND w.date = fl.opened_date` : sql``}`;
}

/**
 * How many lines the filter matches: counted when PostgreSQL's planner expects at most twice
 * EXACT_TOTAL_LIMIT and the count stays within it, otherwise the planner's estimate (from the
 * statistics of the tables, as EXPLAIN reports it).
 */
async function countRepairs(db: Db, parts: readonly Condition[]): Promise<ListTotal> {
  const from = sql`${countFrom(parts)} WHERE ${allOf(parts)}`;
  const plan = await sql<{ "QUERY PLAN": [{ Plan: { "Plan Rows": number } }] }>`EXPLAIN (FORMAT JSON) SELECT 1 ${from}`.execute(db);
  const estimate = Math.round(plan.rows[0]["QUERY PLAN"][0].Plan["Plan Rows"]);
  if (estimate > 2 * EXACT_TOTAL_LIMIT) return { total: estimate, totalIsEstimate: true };
  const counted = await sql<{ n: string }>`SELECT count(*) AS n FROM (SELECT 1 ${from} LIMIT ${EXACT_TOTAL_LIMIT + 1}) x`.execute(db);
  const n = Number(counted.rows[0].n);
  return n <= EXACT_TOTAL_LIMIT ? { total: n, totalIsEstimate: false } : { total: Math.max(estimate, n), totalIsEstimate: true };
}

/**
 * A date column's cell: the rule only ever changes '-infinity' (every other date's text starts with a digit,
 * or is 'infinity'), so that one value is tested rather than the text of every date.
 */
const csvDate = (column: RawBuilder<unknown>) => sql`CASE WHEN ${column} = '-infinity' THEN '''-infinity' ELSE ${column}::text END`;

/**
 * Each CSV column's cell as SQL over a row of the list (`x`), written as the rule of shared/csv-cell.ts writes
 * the row's value: text through csv_cell (migration 0046); the id, a bigint's text, as it is (a plain integer,
 * which the rule leaves alone); numbers as JavaScript's String(Number(v)) writes them, which for the numeric
 * columns (at most 9 significant digits, migration 0002) is the value without trailing zeros: trim_scale
 * ("12.50" → 12.5, "3.0" → 3).
 */
const csvCells: Record<keyof RepairRow, RawBuilder<unknown>> = {
  id: sql`x.id`,
  shopCode: sql`csv_cell(x.shop_code)`,
  roNumber: sql`csv_cell(x.ro_number)`,
  lineNo: sql`x.line_no`,
  openedDate: csvDate(sql`x.opened_date`),
  closedDate: csvDate(sql`x.closed_date`),
  serial: sql`csv_cell(x.serial)`,
  modelLine: sql`csv_cell(x.model_line)`,
  engineFamily: sql`csv_cell(x.engine_family)`,
  componentCode: sql`csv_cell(x.component_code)`,
  componentName: sql`csv_cell(x.component_name)`,
  lineType: sql`csv_cell(x.line_type)`,
  payType: sql`csv_cell(x.pay_type)`,
  hourMeter: sql`trim_scale(x.hour_meter)`,
  laborHours: sql`trim_scale(x.labor_hours)`,
  standardHours: sql`trim_scale(x.standard_hours)`,
  complaint: sql`csv_cell(x.complaint)`,
  cause: sql`csv_cell(x.cause)`,
  partNumber: sql`csv_cell(x.part_number)`,
  supplierLot: sql`csv_cell(x.supplier_lot)`,
  technician: sql`csv_cell(x.technician)`,
};

/**
 * The rows of the repairs CSV as SQL for COPY: every line the filter matches, in list order, one column per
 * repairCsvColumns entry named by its header, each cell already as the CSV holds it. The list's own query
 * sits in a subquery behind OFFSET 0 so the cells are computed after its sort: with them inside, the planner
 * sorts rows three times as wide and prefers walking the order's index through nested loops, which took twice
 * as long over a whole warehouse. The outer ORDER BY names the inner one's keys, so it costs no second sort.
 */
export function repairCsvSelect(scope: ShopScope, r: RepairFilter, order: Pick<RepairListQuery, "sort" | "dir">): RawBuilder<unknown> {
  const exprs = listOrder(order.sort, order.dir).keys.map((k) => k.expr);
  return sql`
    SELECT ${sql.join(repairCsvColumns.map((c) => sql`${csvCells[c.key]} AS ${sql.id(c.label)}`))}
    FROM (
      ${SELECT}, ${sql.join(exprs.map((e, i) => sql`${e} AS ${sql.ref(`o${i}`)}`))}
      ${FROM} WHERE ${conditions(scope, r)}
      ORDER BY ${sorted(exprs, order.dir)} OFFSET 0
    ) x
    ORDER BY ${sorted(exprs.map((_, i) => sql.ref(`x.o${i}`)), order.dir)}`;
}

/** True when the id has the shape of a repair-line key (a signed 64-bit integer). */
export const isRepairLineId = (id: string) => isInt64(id);

/**
 * One repair line with its machine, hour-meter trail, fault codes and measurements, or null when it does
 * not exist or lies outside the caller's scope (the caller cannot tell the two apart).
 */
export async function getRepair(db: Db, scope: ShopScope, id: string): Promise<RepairDetail | null> {
  if (!isRepairLineId(id)) return null;
  const filter: RepairFilter = { filters: emptyFilters, list: {}, ids: [id] };
  const head = await sql<RowRecord & {
    correction: string | null; labor_op: string | null; meter_note: string | null; part_description: string | null; part_qty: string | null;
    part_ordered_date: string | null; part_received_date: string | null; back_ordered: boolean; parts_wait_days: number | null;
    parts_cost: string | null; labor_cost: string | null; ambient_temp_c: string | null; failure_mode: string | null; system: string;
    assembly: string; shop_name: string; machine_key: string; model_code: string; engine_serial: string | null; cold_start_aid: string;
    build_date: string | null; delivery_date: string | null; delivery_hours: string | null; home_shop: string | null;
    heater_plug_lot: string | null; block_heater_fitted: boolean;
  }>`
    ${SELECT}, fl.correction, fl.labor_op, fl.meter_note, fl.part_description, fl.part_qty, fl.part_ordered_date, fl.part_received_date,
           fl.back_ordered, fl.parts_wait_days, fl.parts_cost, fl.labor_cost, fl.ambient_temp_c, fm.name AS failure_mode, c.system,
           c.assembly, s.name AS shop_name, m.machine_key::text AS machine_key, m.model_code, m.engine_serial, m.cold_start_aid,
           m.build_date, m.delivery_date, m.delivery_hours, hs.shop_code AS home_shop, m.heater_plug_lot, m.block_heater_fitted
    ${FROM}
    LEFT JOIN dim_failure_mode fm ON fm.failure_mode_key = fl.failure_mode_key
    LEFT JOIN dim_shop hs ON hs.shop_key = m.home_shop_key
    WHERE ${conditions(scope, filter)}
  `.execute(db);
  const h = head.rows[0];
  if (!h) return null;
  const [hours, codes, measurements, history] = await Promise.all([
    sql<{ reading_date: string; hours: string; source: string; valid: boolean; invalid_reason: string | null; meter_generation: number; meter_note: string | null }>`
      SELECT reading_date, hours, source, valid, invalid_reason, meter_generation, meter_note
      FROM fact_hour_reading WHERE machine_key = ${h.machine_key}::bigint ORDER BY reading_date, hours
    `.execute(db),
    sql<{ spn: number; fmi: number; occurrences: number; meaning: string }>`
      SELECT f.spn, f.fmi, f.occurrences, d.meaning FROM fact_fault_code f JOIN dim_fmi d ON d.fmi = f.fmi
      WHERE f.repair_line_key = ${id}::bigint ORDER BY f.spn, f.fmi
    `.execute(db),
    sql<{ kind: string; position: number; attempt: number; value: string | null; unit: string; over_range: boolean; raw_value: string; raw_unit: string | null; conversion_rule: string; sheet_by: string | null; sheet_at: Date | null }>`
      SELECT fm.kind, fm.position, fm.attempt, fm.value, fm.unit, fm.over_range, fm.raw_value, fm.raw_unit, fm.conversion_rule,
             CASE WHEN b.source = 'sheet' THEN b.loaded_by END AS sheet_by, CASE WHEN b.source = 'sheet' THEN coalesce(b.finished_at, b.started_at) END AS sheet_at
      FROM fact_measurement fm JOIN etl_batch b ON b.batch_id = fm.batch_id
      WHERE fm.repair_line_key = ${id}::bigint ORDER BY fm.kind, fm.position, fm.attempt
    `.execute(db),
    sql<RowRecord>`${SELECT} ${FROM}
      WHERE fl.machine_key = ${h.machine_key}::bigint AND fl.repair_line_key <> ${id}::bigint
        AND ${conditions(scope, { filters: emptyFilters, list: {} })}
      ORDER BY fl.opened_date DESC, fl.line_no LIMIT 50`.execute(db),
  ]);
  const row = toRow(h);
  return {
    line: {
      ...row,
      correction: h.correction,
      laborOp: h.labor_op,
      meterNote: h.meter_note,
      partDescription: h.part_description,
      partQty: num(h.part_qty),
      partOrderedDate: h.part_ordered_date,
      partReceivedDate: h.part_received_date,
      backOrdered: h.back_ordered,
      partsWaitDays: h.parts_wait_days,
      partsCost: num(h.parts_cost),
      laborCost: num(h.labor_cost),
      ambientTempC: num(h.ambient_temp_c),
      failureMode: h.failure_mode,
      system: h.system,
      assembly: h.assembly,
      shopName: h.shop_name,
    },
    machine: {
      serial: h.serial,
      modelCode: h.model_code,
      modelLine: h.model_line,
      engineFamily: h.engine_family,
      engineSerial: h.engine_serial,
      coldStartAid: h.cold_start_aid,
      buildDate: h.build_date,
      deliveryDate: h.delivery_date,
      deliveryHours: num(h.delivery_hours),
      // a machine serviced here but at home in a shop outside the caller's scope: that shop is not named
      homeShop: h.home_shop !== null && scopeIncludes(scope, h.home_shop) ? h.home_shop : null,
      heaterPlugLot: h.heater_plug_lot,
      blockHeaterFitted: h.block_heater_fitted,
      hoursTrail: hours.rows.map((x) => ({
        date: x.reading_date,
        hours: Number(x.hours),
        source: x.source,
        valid: x.valid,
        invalidReason: x.invalid_reason,
        meterGeneration: x.meter_generation,
        meterNote: x.meter_note,
      })),
    },
    faultCodes: codes.rows.map((c) => ({ spn: c.spn, fmi: c.fmi, occurrences: c.occurrences, fmiMeaning: c.meaning })),
    measurements: measurements.rows.map((x) => ({
      kind: x.kind,
      position: x.position,
      attempt: x.attempt,
      value: num(x.value),
      unit: x.unit,
      overRange: x.over_range,
      rawValue: x.raw_value,
      rawUnit: x.raw_unit,
      conversionRule: x.conversion_rule,
      sheet: x.sheet_by !== null && x.sheet_at !== null ? { by: x.sheet_by, at: x.sheet_at.toISOString() } : null,
    })),
    machineHistory: history.rows.map(toRow).map((x) => ({
      id: x.id, shopCode: x.shopCode, roNumber: x.roNumber, lineNo: x.lineNo, openedDate: x.openedDate, componentName: x.componentName, lineType: x.lineType, hourMeter: x.hourMeter,
    })),
  };
}

