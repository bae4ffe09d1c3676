import { sql, type RawBuilder } from "kysely";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { AnalyticsFilters } from "../../../shared/schemas/analytics-filters.js";
import type { RepairDetail, RepairListQuery, RepairRow, RepairSortKey } from "../../../shared/schemas/repairs.js";
import { scopedShopCodes } from "./scope.js";
import { hourBandSql, temperatureBandSql } from "../../../shared/band-sql.js";

/** What a repair-line listing is filtered by: the shared analytics filters, the list's own parameters, optional ids. */
export interface RepairFilter {
  filters: AnalyticsFilters;
  list: Partial<Pick<RepairListQuery, "q" | "lineType" | "payType">>;
  /** restrict to these repair_line_keys (e.g. a cluster's lines) */
  ids?: readonly string[];
}

const emptyFilters: AnalyticsFilters = {
  shops: [], engineFamilies: [], modelLines: [], components: [], lots: [], tempBands: [], hourBands: [],
};

const inList = (col: RawBuilder<unknown>, values: readonly string[]) => sql`${col} IN (${sql.join(values.map((v) => sql`${v}`))})`;
const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * WHERE conditions over fact_repair_line fl, dim_shop s (the shop that did the repair), dim_machine m,
 * dim_component c and fact_weather_day w (that shop's weather on the day the order opened). The caller's
 * scope applies to the repairing shop: a manager sees the lines their shops wrote.
 */
function conditions(scope: ShopScope, r: RepairFilter): RawBuilder<unknown> {
  const f = r.filters;
  const parts: RawBuilder<unknown>[] = [];
  const scoped = scopedShopCodes(scope);
  if (scoped) parts.push(scoped.length ? inList(sql.ref("s.shop_code"), scoped) : sql`FALSE`);
  if (r.ids) parts.push(r.ids.length ? sql`fl.repair_line_key IN (${sql.join(r.ids.map((id) => sql`${id}::bigint`))})` : sql`FALSE`);
  if (f.from) parts.push(sql`fl.opened_date >= ${f.from}::date`);
  if (f.to) parts.push(sql`fl.opened_date <= ${f.to}::date`);
  if (f.shops.length) parts.push(inList(sql.ref("s.shop_code"), f.shops.map((s) => s.toUpperCase())));
  if (f.engineFamilies.length) parts.push(inList(sql.ref("m.engine_family"), f.engineFamilies));
  if (f.modelLines.length) parts.push(inList(sql.ref("m.model_line"), f.modelLines));
  if (f.components.length) parts.push(inList(sql.ref("c.component_code"), f.components));
  if (f.lots.length) parts.push(sql`(${inList(sql.ref("m.heater_plug_lot"), f.lots)} OR ${inList(sql.ref("fl.supplier_lot"), f.lots)})`);
  const build = sql`date_trunc('month', coalesce(m.build_date, m.delivery_date))::date`;
  if (f.buildFrom) parts.push(sql`${build} >= ${`${f.buildFrom}-01`}::date`);
  if (f.buildTo) parts.push(sql`${build} <= ${`${f.buildTo}-01`}::date`);
  if (f.tempBands.length) parts.push(inList(temperatureBandSql(sql`w.tmin_c`), f.tempBands));
  if (f.hourBands.length) parts.push(inList(hourBandSql(sql`fl.hour_meter`), f.hourBands));
  if (r.list.lineType) parts.push(sql`fl.line_type = ${r.list.lineType}`);
  if (r.list.payType) parts.push(sql`fl.pay_type = ${r.list.payType}`);
  if (r.list.q) {
    const like = `%${likeEscape(r.list.q)}%`;
    parts.push(sql`(fl.ro_number ILIKE ${like} OR m.serial ILIKE ${like} OR fl.complaint ILIKE ${like} OR fl.cause ILIKE ${like}
      OR fl.correction ILIKE ${like} OR fl.part_number ILIKE ${like} OR fl.supplier_lot ILIKE ${like} OR c.name ILIKE ${like})`);
  }
  return parts.length ? sql.join(parts, sql` AND `) : sql`TRUE`;
}

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

const sortColumns: Record<RepairSortKey, RawBuilder<unknown>> = {
  opened: sql`fl.opened_date`,
  closed: sql`fl.closed_date`,
  shop: sql`s.shop_code`,
  ro: sql`fl.ro_number`,
  serial: sql`m.serial`,
  model: sql`m.model_line`,
  engineFamily: sql`m.engine_family`,
  component: sql`c.name`,
  hours: sql`fl.hour_meter`,
  laborHours: sql`fl.labor_hours`,
  payType: sql`fl.pay_type`,
  lineType: sql`fl.line_type`,
};

const orderBy = (sort: RepairSortKey, dir: "asc" | "desc") =>
  sql`ORDER BY ${sortColumns[sort]} ${sql.raw(dir === "asc" ? "ASC NULLS LAST" : "DESC NULLS LAST")}, fl.ro_number, fl.line_no, fl.repair_line_key`;

interface RowRecord {
  id: string; shop_code: string; ro_number: string; line_no: number; opened_date: string; closed_date: string | null; serial: string;
  model_line: string; engine_family: string; component_code: string; component_name: string; line_type: string; pay_type: string;
  hour_meter: string | null; labor_hours: string | null; standard_hours: string | null; complaint: string | null; cause: string | null;
  part_number: string | null; supplier_lot: string | null; technician: string | null;
}

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

/** One page of repair lines and the total that match, sorted on the server. */
export async function listRepairs(
  db: Db,
  scope: ShopScope,
  r: RepairFilter,
  page: Pick<RepairListQuery, "page" | "pageSize" | "sort" | "dir">,
): Promise<{ total: number; rows: RepairRow[] }> {
  const where = conditions(scope, r);
  const [count, rows] = await Promise.all([
    sql<{ n: string }>`SELECT count(*) AS n ${FROM} WHERE ${where}`.execute(db),
    sql<RowRecord>`${SELECT} ${FROM} WHERE ${where} ${orderBy(page.sort, page.dir)}
      LIMIT ${page.pageSize} OFFSET ${(page.page - 1) * page.pageSize}`.execute(db),
  ]);
  return { total: Number(count.rows[0]?.n ?? 0), rows: rows.rows.map(toRow) };
}

/**
 * Every matching repair line in list order, handed over in batches from one consistent snapshot
 * (REPEATABLE READ), so a CSV can be streamed without holding the whole result in memory.
 */
export async function eachRepairBatch(
  db: Db,
  scope: ShopScope,
  r: RepairFilter,
  order: Pick<RepairListQuery, "sort" | "dir">,
  onBatch: (rows: RepairRow[]) => Promise<void>,
  batchSize = 2000,
): Promise<number> {
  const where = conditions(scope, r);
  return await db.transaction().setIsolationLevel("repeatable read").execute(async (trx) => {
    let offset = 0;
    for (;;) {
      const res = await sql<RowRecord>`${SELECT} ${FROM} WHERE ${where} ${orderBy(order.sort, order.dir)}
        LIMIT ${batchSize} OFFSET ${offset}`.execute(trx);
      if (res.rows.length) await onBatch(res.rows.map(toRow));
      offset += res.rows.length;
      if (res.rows.length < batchSize) return offset;
    }
  });
}

/** True when the id has the shape of a repair-line key (a signed 64-bit integer). */
export const isRepairLineId = (id: string) => /^-?\d{1,19}$/.test(id);

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
    sql<{ kind: string; position: number; attempt: number; value: string | null; unit: string; over_range: boolean; raw_value: string; raw_unit: string | null; conversion_rule: string }>`
      SELECT kind, position, attempt, value, unit, over_range, raw_value, raw_unit, conversion_rule
      FROM fact_measurement WHERE repair_line_key = ${id}::bigint ORDER BY kind, position, attempt
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
      homeShop: h.home_shop,
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
    })),
    machineHistory: history.rows.map(toRow).map((x) => ({
      id: x.id, shopCode: x.shopCode, roNumber: x.roNumber, lineNo: x.lineNo, openedDate: x.openedDate, componentName: x.componentName, lineType: x.lineType, hourMeter: x.hourMeter,
    })),
  };
}

