/**
 * The bench sheet's reads: open repair-order lines of the caller's shops by RO number or serial, one line with
 * the readings entered for it, and whether a line is in the warehouse at all. Writes go through the ETL's
 * loader (server/services/bench-sheet/save-sheet.ts), never from here.
 */
import { sql } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import { engineFamilies, HEATER_PLUG } from "../../../shared/catalog.js";
import { benchLineId, BENCH_OPEN_DAYS, type BenchLine, type BenchReading } from "../../../shared/schemas/bench-sheet.js";
import { scopedShopCodes } from "./scope.js";

interface LineRecord {
  shop_code: string;
  ro_number: string;
  line_no: number;
  serial: string;
  model_line: string | null;
  engine_family: string | null;
  opened_date: string;
  closed_date: string | null;
  complaint: string | null;
  created_on_sheet: boolean;
  sheet_readings: number;
}

const cylindersOf = (family: string | null) => engineFamilies.find((f) => f.code === family)?.cylinders ?? null;

const toLine = (r: LineRecord): BenchLine => ({
  id: benchLineId(r.shop_code, r.ro_number, r.line_no),
  shopCode: r.shop_code,
  roNumber: r.ro_number,
  lineNo: r.line_no,
  serial: r.serial,
  modelLine: r.model_line,
  engineFamily: r.engine_family,
  cylinders: cylindersOf(r.engine_family),
  openedDate: r.opened_date,
  closedDate: r.closed_date,
  complaint: r.complaint,
  createdOnSheet: r.created_on_sheet,
  sheetReadings: r.sheet_readings,
});

const scopeSql = (scope: ShopScope) => {
  const shops = scopedShopCodes(scope);
  if (shops === null) return sql`TRUE`;
  return shops.length ? sql`s.shop_code IN (${sql.join(shops.map((c) => sql`${c}`))})` : sql`FALSE`;
};

const LINE_SELECT = sql`
  SELECT fl.repair_line_key::text AS key, s.shop_code, fl.ro_number, fl.line_no, m.serial, m.model_line, m.engine_family, fl.opened_date, fl.closed_date, fl.complaint,
         (fb.source = 'sheet') AS created_on_sheet,
         (SELECT count(*)::int FROM fact_measurement fm JOIN etl_batch mb ON mb.batch_id = fm.batch_id
           WHERE fm.repair_line_key = fl.repair_line_key AND mb.source = 'sheet') AS sheet_readings
  FROM fact_repair_line fl
  JOIN dim_shop s ON s.shop_key = fl.shop_key
  JOIN dim_machine m ON m.machine_key = fl.machine_key
  JOIN etl_batch fb ON fb.batch_id = fl.first_batch_id`;

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * Open lines (no close date, or closed within BENCH_OPEN_DAYS days of `today`) of the caller's shops whose RO
 * number or machine serial contains `q`, any case; dashes and spaces in a serial are ignored, as the loader
 * strips them. Newest first, at most 50.
 */
export async function searchOpenLines(db: Db, scope: ShopScope, q: string, today: string): Promise<BenchLine[]> {
  const text = `%${likeEscape(q.trim().toUpperCase())}%`;
  const serial = `%${likeEscape(q.toUpperCase().replace(/[\s-]+/g, ""))}%`;
  const r = await sql<LineRecord>`
    ${LINE_SELECT}
    WHERE ${scopeSql(scope)}
      AND (fl.closed_date IS NULL OR fl.closed_date >= ${today}::date - ${BENCH_OPEN_DAYS}::int)
      AND (upper(fl.ro_number) LIKE ${text} OR m.serial LIKE ${serial})
    ORDER BY fl.opened_date DESC, s.shop_code, fl.ro_number, fl.line_no
    LIMIT 50
  `.execute(db);
  return r.rows.map(toLine);
}

/** One line of the caller's shops, or null when it is not in the warehouse or lies outside the scope. */
export async function getBenchLine(db: Db, scope: ShopScope, shopCode: string, roNumber: string, lineNo: number): Promise<(BenchLine & { key: string }) | null> {
  const r = await sql<LineRecord & { key: string }>`
    ${LINE_SELECT}
    WHERE ${scopeSql(scope)} AND s.shop_code = ${shopCode} AND fl.ro_number = ${roNumber} AND fl.line_no = ${lineNo}
  `.execute(db);
  const row = r.rows[0];
  return row ? { ...toLine(row), key: row.key } : null;
}

/** True when the warehouse holds the line, whoever's shop it is (for a refusal to add it twice). */
export async function lineExists(db: Db, shopCode: string, roNumber: string, lineNo: number): Promise<boolean> {
  const r = await sql<{ n: number }>`
    SELECT count(*)::int AS n FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
    WHERE s.shop_code = ${shopCode} AND fl.ro_number = ${roNumber} AND fl.line_no = ${lineNo}
  `.execute(db);
  return (r.rows[0]?.n ?? 0) > 0;
}

/** The readings of a line with where each came from (a bench sheet or an export), who loaded it and when. */
export async function lineReadings(db: Db, repairLineKey: string): Promise<BenchReading[]> {
  const r = await sql<{
    kind: string; position: number; attempt: number; value: string | null; unit: string; over_range: boolean; raw_value: string;
    raw_unit: string | null; source: "sheet" | "export"; loaded_by: string; loaded_at: Date;
  }>`
    SELECT fm.kind, fm.position, fm.attempt, fm.value, fm.unit, fm.over_range, fm.raw_value, fm.raw_unit, b.source, b.loaded_by,
           coalesce(b.finished_at, b.started_at) AS loaded_at
    FROM fact_measurement fm JOIN etl_batch b ON b.batch_id = fm.batch_id
    WHERE fm.repair_line_key = ${repairLineKey}::bigint
    ORDER BY fm.kind, fm.position, fm.attempt
  `.execute(db);
  return r.rows.map((x) => ({
    kind: x.kind,
    position: x.position,
    attempt: x.attempt,
    value: x.value === null ? null : Number(x.value),
    unit: x.unit,
    overRange: x.over_range,
    rawValue: x.raw_value,
    rawUnit: x.raw_unit,
    source: x.source,
    loadedBy: x.loaded_by,
    loadedAt: x.loaded_at.toISOString(),
  }));
}

/** The latest hour-meter reading entered on a sheet for the machine on or after the line opened. */
export async function sheetHourMeter(db: Db, serial: string, openedDate: string): Promise<{ hours: number; readingDate: string; loadedBy: string } | null> {
  const r = await sql<{ hours: string; reading_date: string; loaded_by: string }>`
    SELECT h.hours, h.reading_date, b.loaded_by
    FROM fact_meter_reading h JOIN dim_machine m ON m.machine_key = h.machine_key JOIN etl_batch b ON b.batch_id = h.batch_id
    WHERE m.serial = ${serial} AND h.source = 'sheet' AND h.reading_date >= ${openedDate}::date
    ORDER BY h.reading_date DESC LIMIT 1
  `.execute(db);
  const row = r.rows[0];
  return row ? { hours: Number(row.hours), readingDate: row.reading_date, loadedBy: row.loaded_by } : null;
}

/** Rows of the facts a sheet writes, for a save's before/after (and the tests' "nothing half-saved"). */
export async function sheetFactCounts(db: Db): Promise<{ lines: number; readings: number; hours: number }> {
  const r = await sql<{ lines: number; readings: number; hours: number }>`
    SELECT (SELECT count(*)::int FROM fact_repair_line) AS lines, (SELECT count(*)::int FROM fact_measurement) AS readings,
           (SELECT count(*)::int FROM fact_meter_reading) AS hours
  `.execute(db);
  return r.rows[0]!;
}

/** Order lines needed before a typical wait is stated: fewer say nothing reliable. */
export const MIN_WAIT_LINES = 5;

export interface PlugPartsRow {
  partNumber: string;
  /** median days from order to receipt, over the part's received lines in the window; null with fewer than MIN_WAIT_LINES */
  typicalWaitDays: number | null;
  p90WaitDays: number | null;
  /** a line of the part at the shop is back-ordered and not received yet */
  backOrderedNow: boolean;
  /** received lines of the part in the window (the wait figures' basis) */
  lines: number;
}

/**
 * The heater plug of an engine family as the parts desk sees it: the part number the shops' heater-plug lines
 * for that family use most, its order-to-receipt wait over the group's lines ordered in the 12 months up to
 * `through` (default: the newest order date in the warehouse; the median and 90th percentile, PostgreSQL's
 * percentile_cont, i.e. linear interpolation between order statistics), and whether a line of it at `shopCode`
 * is back-ordered and not received. Lines still waiting are left out of the figures (their wait is not known
 * yet), so in a back-order spell the figures run short. Null when the family's lines carry no part number.
 */
export async function plugParts(db: Db, family: string | null, shopCode: string, through?: string): Promise<PlugPartsRow | null> {
  if (!family) return null;
  const r = await sql<{ part_number: string; lines: number; p50: number | null; p90: number | null; back_ordered_now: boolean }>`
    WITH part AS (
      SELECT fl.part_number
      FROM fact_repair_line fl
      JOIN dim_machine m ON m.machine_key = fl.machine_key
      JOIN dim_component c ON c.component_key = fl.component_key
      WHERE c.component_code = ${HEATER_PLUG} AND m.engine_family = ${family} AND fl.part_number IS NOT NULL
      GROUP BY fl.part_number
      ORDER BY count(*) DESC, fl.part_number
      LIMIT 1
    ), upto AS (
      SELECT coalesce(${through ?? null}::date, (SELECT max(part_ordered_date) FROM fact_repair_line)) AS d
    ), waits AS (
      SELECT fl.parts_wait_days AS days
      FROM fact_repair_line fl, part, upto
      WHERE fl.part_number = part.part_number AND fl.parts_wait_days >= 0
        AND fl.part_ordered_date > (upto.d - interval '12 months')::date AND fl.part_ordered_date <= upto.d
    )
    SELECT part.part_number,
           (SELECT count(*)::int FROM waits) AS lines,
           (SELECT percentile_cont(0.5) WITHIN GROUP (ORDER BY days) FROM waits) AS p50,
           (SELECT percentile_cont(0.9) WITHIN GROUP (ORDER BY days) FROM waits) AS p90,
           EXISTS (
             SELECT 1 FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
             WHERE fl.part_number = part.part_number AND s.shop_code = ${shopCode} AND fl.back_ordered AND fl.part_received_date IS NULL
           ) AS back_ordered_now
    FROM part
  `.execute(db);
  const row = r.rows[0];
  if (!row) return null;
  const enough = row.lines >= MIN_WAIT_LINES;
  return {
    partNumber: row.part_number,
    typicalWaitDays: enough && row.p50 !== null ? Number(row.p50) : null,
    p90WaitDays: enough && row.p90 !== null ? Number(row.p90) : null,
    backOrderedNow: row.back_ordered_now,
    lines: row.lines,
  };
}
