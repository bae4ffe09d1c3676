import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { refreshExposure } from "../../etl/derived/refresh-exposure.js";
import { loadFile } from "../../etl/load/load-file.js";
import { hourBandSql, storageBandSql, UNKNOWN_BAND } from "../../shared/band-sql.js";
import { storageBands } from "../../shared/bands.js";
import { HEATER_PLUG } from "../../shared/catalog.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";
import { fixture, TODAY } from "./helpers.js";

/**
 * The exposure aggregates kept by difference (refreshExposure after each load) equal a full rebuild row for
 * row after every load of a sequence that touches each input of the computation, and the full rebuild, which
 * works per reading segment, equals the reference implementation below, which labels every machine-day.
 * Two warehouses take the same loads: one is refreshed incrementally, the other rebuilt in full.
 * Machine-days must be equal; engine hours equal up to floating-point rounding (common practice, no source:
 * a relative difference of 1e-6, or 1e-9 h near zero).
 */

/**
 * Reference implementation: the day-by-day rebuild the per-segment computation replaced. Every machine-day
 * between two consecutive valid readings gets its interpolated engine hours, the home shop the machine had that
 * day (machine_home_shop) and that shop's daily-minimum band, its hour band and the heater-plug lot fitted that
 * day, and the days are grouped.
 */
function referenceExposure() {
  const hAt = sql`d.h_at`;
  const tmin = sql`w.tmin_c`;
  return sql<AggRow>`
    WITH seg AS (
      SELECT machine_key, reading_date AS d0, engine_hours AS h0,
             lead(reading_date) OVER w AS d1, lead(engine_hours) OVER w AS h1
      FROM v_engine_hours
      WINDOW w AS (PARTITION BY machine_key ORDER BY reading_date)
    ), days AS (
      SELECT s.machine_key, (s.d0 + k) AS day,
             s.h0 + (s.h1 - s.h0) * (k::double precision / (s.d1 - s.d0)) AS h_at,
             (s.h1 - s.h0) / (s.d1 - s.d0) AS h_day
      FROM seg s CROSS JOIN LATERAL generate_series(0, s.d1 - s.d0 - 1) AS k
      WHERE s.d1 IS NOT NULL AND s.h1 >= s.h0
    ), repl AS (
      SELECT DISTINCT ON (f.machine_key) f.machine_key, f.opened_date AS repl_date,
             coalesce(nullif(f.supplier_lot, ''), 'replacement') AS repl_lot
      FROM fact_repair_line f JOIN dim_component c USING (component_key)
      WHERE c.component_code = ${HEATER_PLUG} AND f.line_type = 'failure'
      ORDER BY f.machine_key, f.opened_date
    ), mach AS (
      SELECT m.machine_key, m.engine_family, m.model_line,
             date_trunc('month', coalesce(m.build_date, m.delivery_date))::date AS build_month,
             coalesce(nullif(m.heater_plug_lot, ''), 'none') AS build_lot, r.repl_date, r.repl_lot
      FROM dim_machine m LEFT JOIN repl r USING (machine_key)
      WHERE m.home_shop_key IS NOT NULL
    ), wd AS (
      SELECT w.shop_key, w.date, date_trunc('month', w.date)::date AS month, ${storageBandSql(tmin)} AS temp_band
      FROM fact_weather_day w
    )
    SELECT m.engine_family, m.model_line, m.build_month,
           CASE WHEN d.day >= m.repl_date THEN m.repl_lot ELSE m.build_lot END AS lot,
           hs.shop_key, coalesce(wd.month, date_trunc('month', d.day)::date) AS month,
           coalesce(wd.temp_band, ${UNKNOWN_BAND}) AS temp_band, ${hourBandSql(hAt)} AS hour_band,
           0 AS machines, count(*)::integer AS machine_days, sum(d.h_day) AS engine_hours
    FROM days d
    JOIN mach m ON m.machine_key = d.machine_key
    JOIN machine_home_shop hs ON hs.machine_key = d.machine_key AND hs.valid_from <= d.day AND (hs.valid_to IS NULL OR d.day < hs.valid_to)
    LEFT JOIN wd ON wd.shop_key = hs.shop_key AND wd.date = d.day
    GROUP BY 1, 2, 3, 4, 5, 6, 7, 8
  `;
}

interface AggRow {
  engine_family: string;
  model_line: string;
  build_month?: string;
  lot?: string;
  shop_key: string;
  month: string;
  temp_band: string;
  hour_band: string;
  machines?: number;
  machine_days: number;
  engine_hours: number;
}

const keyOf = ({ machine_days: _d, engine_hours: _h, ...grain }: AggRow) => JSON.stringify(grain);

/** Rows keyed by their grain (and `machines`), for a comparison that names the rows that differ. */
function byGrain(rows: AggRow[]): Map<string, AggRow> {
  return new Map(rows.map((r) => [keyOf(r), r]));
}

/** The rows of `actual` that are missing, extra or different from `expected` (engine hours up to rounding). */
function differences(actual: AggRow[], expected: AggRow[]): string[] {
  const a = byGrain(actual);
  const e = byGrain(expected);
  const out: string[] = [];
  for (const [k, x] of e) {
    const y = a.get(k);
    if (!y) out.push(`missing ${k}`);
    else if (y.machine_days !== x.machine_days || !(Math.abs(y.engine_hours - x.engine_hours) <= 1e-6 * Math.max(Math.abs(x.engine_hours), Math.abs(y.engine_hours)) + 1e-9)) {
      out.push(`${k}: ${y.machine_days} days ${y.engine_hours} h, expected ${x.machine_days} days ${x.engine_hours} h`);
    }
  }
  for (const k of a.keys()) if (!e.has(k)) out.push(`extra ${k}`);
  return out;
}

async function aggregates(t: TestDb): Promise<{ exposure: AggRow[]; fleet: AggRow[] }> {
  const exposure = await sql<AggRow>`SELECT * FROM agg_exposure`.execute(t.db);
  const fleet = await sql<AggRow>`SELECT * FROM agg_exposure_fleet`.execute(t.db);
  return { exposure: exposure.rows, fleet: fleet.rows };
}

/** agg_exposure_fleet as the sum of agg_exposure-grained rows over build month and lot. */
function fleetOf(rows: AggRow[]): AggRow[] {
  const out = new Map<string, AggRow>();
  for (const { build_month: _b, lot: _l, machines: _m, ...r } of rows) {
    const k = keyOf(r);
    const acc = out.get(k);
    if (acc) {
      acc.machine_days += r.machine_days;
      acc.engine_hours += r.engine_hours;
    } else out.set(k, { ...r });
  }
  return [...out.values()];
}

// ---- the loads -----------------------------------------------------------------------------------------

const dir = mkdtempSync(path.join(os.tmpdir(), "exposure-incremental-"));
const write = (name: string, lines: string[]) => {
  const file = path.join(dir, name);
  writeFileSync(file, lines.join("\n") + "\n");
  return file;
};
const JOBS_HEADER = readFileSync(fixture("jobs-export-1.csv"), "utf8").split("\n")[0];
const HOURS_HEADER = "serial,reading_date,hours,source,meter_note";
const MACHINES_HEADER = readFileSync(fixture("machines.csv"), "utf8").split("\n")[0];

/** A job line in the generic layout: shop, RO, serial, opened date, hour meter, component, part lot. */
const job = (shop: string, ro: string, serial: string, day: string, hours: number, component = "HYD-LIN-HOSE", lot = "", labour = "1.0") =>
  `${shop},${ro},1,${serial},${day},${day},${hours},,Complaint,Cause,Correction,${component},WEAR,,1.0,${labour},40.00,110.00,customer,failure,${shop}-T1,` +
  `${lot ? "HP-26104,Glow plug set,1," + lot : ",,,"},,,N,,`;

/** Daily weather from `from` for `days` days, minima (°C) cycling through every storage band, with a gap every eleventh day. */
function weather(shop: string, from: string, days: number, shift = 0): string[] {
  const minima = [-25, -19, -12, -8, -3, 2, 6, 9, 15];
  const out: string[] = [];
  for (let i = 0; i < days; i++) {
    if (i % 11 === 5) continue;
    const day = new Date(Date.parse(`${from}T00:00:00Z`) + i * 86_400_000).toISOString().slice(0, 10);
    const tmin = minima[(i * 7 + shift) % minima.length];
    out.push(`${shop},${day},${tmin},${tmin + 8}`);
  }
  return out;
}

const correction = [
  JOBS_HEADER,
  job("S4", "R-101", "KSKL-20002", "2024-01-05", 710),
  job("S5", "R-103", "KSKL-20002", "2024-02-07", 780),
  job("S4", "R-104", "KSKL-20002", "2024-04-10", 1200),
];

const steps: { name: string; file: string }[] = [
  { name: "the machine master", file: fixture("machines.csv") },
  { name: "weather of two shops", file: write("weather.csv", ["shop_code,date,tmin,tmax", ...weather("S4", "2023-11-01", 182), ...weather("S5", "2024-01-01", 46, 3)]) },
  {
    name: "telematics hours",
    file: write("hours-1.csv", [
      HOURS_HEADER,
      "KDLV-20001,2023-10-01,3700,telematics,", "KDLV-20001,2023-11-01,3850,telematics,", "KDLV-20001,2023-12-01,3990,telematics,",
      "KDLV-20001,2024-02-15,4100,telematics,",
      "KSKL-20002,2023-06-01,400,telematics,", "KSKL-20002,2023-09-01,560,telematics,", "KSKL-20002,2023-12-01,690,telematics,",
      "KSKL-20002,2024-02-01,760,telematics,",
      "KWRN-20003,2023-01-01,150,telematics,", "KWRN-20003,2023-08-01,260,telematics,", "KWRN-20003,2024-02-20,360,telematics,",
    ]),
  },
  { name: "a jobs export with a heater-plug failure", file: fixture("jobs-export-1.csv") },
  { name: "a jobs file with rejects and a replaced hour meter", file: fixture("jobs-bad-rows.csv") },
  { name: "hour readings, one going backwards (rejected)", file: fixture("hours-backwards.csv") },
  { name: "a correcting re-export that updates a line", file: fixture("jobs-export-2.csv") },
  { name: "a correction that changes readings and moves a line to another machine", file: write("jobs-correction.csv", correction) },
  {
    name: "hour readings on a replaced meter, and one that makes an unchanged line's rise too steep",
    file: write("hours-2.csv", [HOURS_HEADER, "KDLV-20001,2024-04-01,400,telematics,", "KSKL-20002,2024-04-09,1150,telematics,"]),
  },
  {
    name: "a re-export whose unchanged line is judged again and set aside",
    file: write("jobs-correction-2.csv", [...correction, job("S5", "R-102", "KWRN-20003", "2024-01-07", 300, "HYD-LIN-HOSE", "", "1.4")]),
  },
  {
    name: "heater-plug replacements that move the lot",
    file: write("jobs-plugs.csv", [
      JOBS_HEADER,
      job("S4", "R-200", "KDLV-20001", "2023-11-15", 3920, HEATER_PLUG, "BT-2301"),
      job("S4", "R-201", "KSKL-20002", "2024-03-20", 900, HEATER_PLUG, "QL-9090"),
    ]),
  },
  {
    name: "weather for a past month and a corrected day",
    file: write("weather-past.csv", ["shop_code,date,tmin,tmax", ...weather("S4", "2023-10-01", 31, 2), "S4,2024-01-10,-30,-20", ...weather("S5", "2023-12-01", 31, 4)]),
  },
  {
    name: "master data that moves a machine to another shop and cohort",
    file: write("machines-correction.csv", [
      readFileSync(fixture("machines.csv"), "utf8").split("\n")[0],
      "KSKL-20002,SKL,E26-60002,2022-03-14,2022-04-20,2.0,S5,QL-2201,N,,24,2000,36,3000",
      "KWRN-20003,WRN,E18-60003,2022-05-02,2022-06-30,0.8,S5,QL-2299,Y,2022-06-30,24,2000,36,3000",
    ]),
  },
  { name: "the same master file again (already loaded)", file: path.join(dir, "machines-correction.csv") },
  {
    name: "a move of home shop dated in the middle of a machine's trail",
    file: write("machines-move.csv", [MACHINES_HEADER + ",home_shop_since", "KDLV-20001,DLV,E26-60001,2021-10-04,2021-12-01,1.5,S5,BT-2109,N,,24,2000,36,3000,2024-01-15"]),
  },
  {
    name: "weather of both shops in the months of the move",
    file: write("weather-move.csv", ["shop_code,date,tmin,tmax", "S4,2024-01-20,-40,-31", ...weather("S5", "2024-02-16", 60, 5)]),
  },
  {
    name: "a move back dated before the current home shop began (rejected), and one after it",
    file: write("machines-move-back.csv", [
      MACHINES_HEADER + ",home_shop_since",
      "KDLV-20001,DLV,E26-60001,2021-10-04,2021-12-01,1.5,S4,BT-2109,N,,24,2000,36,3000,2024-01-10",
      "KWRN-20003,WRN,E18-60003,2022-05-02,2022-06-30,0.8,S4,QL-2299,Y,2022-06-30,24,2000,36,3000,2024-02-01",
    ]),
  },
  {
    name: "a third home shop for the moved machine, from the middle of its trail",
    file: write("machines-move-again.csv", [MACHINES_HEADER + ",home_shop_since", "KDLV-20001,DLV,E26-60001,2021-10-04,2021-12-01,1.5,S4,BT-2109,N,,24,2000,36,3000,2024-03-03"]),
  },
];

describe("exposure aggregates kept by difference", () => {
  let inc: TestDb;
  let full: TestDb;
  beforeAll(async () => {
    inc = await freshTestDb();
    full = await freshTestDb();
  });
  afterAll(async () => {
    await inc?.drop();
    await full?.drop();
    rmSync(dir, { recursive: true, force: true });
  });

  for (const [i, step] of steps.entries()) {
    it(`equal a full rebuild, and the day-by-day reference, after ${step.name}`, async () => {
      for (const t of [inc, full]) await loadFile(t.pool, { path: step.file, loadedBy: "test", today: TODAY });
      const refreshed = await refreshExposure(inc.db);
      expect(refreshed.mode).toBe(i === 0 ? "full" : "incremental");
      await refreshExposure(full.db, { full: true });

      const reference = (await referenceExposure().execute(full.db)).rows;
      const rebuilt = await aggregates(full);
      expect(differences(rebuilt.exposure, reference)).toEqual([]);
      expect(differences(rebuilt.fleet, fleetOf(reference))).toEqual([]);

      const folded = await aggregates(inc);
      expect(differences(folded.exposure, rebuilt.exposure)).toEqual([]);
      expect(differences(folded.fleet, rebuilt.fleet)).toEqual([]);
      const shares = (t: TestDb) => sql<AggRow>`SELECT * FROM agg_exposure_machine`.execute(t.db);
      expect(differences((await shares(inc)).rows, (await shares(full)).rows)).toEqual([]);
      // the per-machine hour trails the life curves read: kept by machine, equal to a rebuild row for row
      const trails = async (t: TestDb) =>
        (await sql`SELECT * FROM agg_machine_trail ORDER BY machine_key`.execute(t.db)).rows;
      expect(await trails(inc)).toEqual(await trails(full));
      expect(await trails(full)).toEqual(
        (await sql`SELECT machine_key, min(engine_hours) AS first_h, max(engine_hours) AS last_h, min(reading_date) AS first_d
                   FROM v_engine_hours GROUP BY machine_key ORDER BY machine_key`.execute(full.db)).rows,
      );
      const rows = await sql<{ rows: number }>`SELECT rows FROM agg_refresh WHERE name = 'exposure'`.execute(inc.db);
      expect(rows.rows[0].rows).toBe(folded.exposure.length);
    });
  }

  it("went through what the computation distinguishes", async () => {
    const rows = (await referenceExposure().execute(full.db)).rows;
    const seen = (k: keyof AggRow) => new Set(rows.map((r) => r[k]));
    expect([...seen("temp_band")].sort()).toEqual([...storageBands.map((b) => b.id), UNKNOWN_BAND].sort());
    expect(seen("hour_band")).toEqual(new Set(["0-500", "500-1k", "1k-2k", "2k-3k", "3k-4k", "4k-6k"]));
    expect(seen("lot")).toEqual(new Set(["BT-2109", "BT-2301", "QL-2201", "QL-9090", "QL-2299"]));
    // the moves: KDLV-20001 at S4, at S5 from 2024-01-15, at S4 again from 2024-03-03; KWRN-20003 at S4 from 2024-02-01;
    // KSKL-20002 at S5 from the load date of its correction
    const periods = await sql<{ serial: string; shop: string; valid_from: string; valid_to: string | null }>`
      SELECT m.serial, s.shop_code AS shop, h.valid_from::text AS valid_from, h.valid_to::text AS valid_to
      FROM machine_home_shop h JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = h.shop_key
      ORDER BY m.serial, h.valid_from`.execute(inc.db);
    expect(periods.rows).toEqual([
      { serial: "KDLV20001", shop: "S4", valid_from: "-infinity", valid_to: "2024-01-15" },
      { serial: "KDLV20001", shop: "S5", valid_from: "2024-01-15", valid_to: "2024-03-03" },
      { serial: "KDLV20001", shop: "S4", valid_from: "2024-03-03", valid_to: null },
      { serial: "KSKL20002", shop: "S4", valid_from: "-infinity", valid_to: TODAY },
      { serial: "KSKL20002", shop: "S5", valid_from: TODAY, valid_to: null },
      { serial: "KWRN20003", shop: "S5", valid_from: "-infinity", valid_to: "2024-02-01" },
      { serial: "KWRN20003", shop: "S4", valid_from: "2024-02-01", valid_to: null },
    ]);
    const shops = await sql<{ serial: string; shops: string }>`
      SELECT m.serial, string_agg(DISTINCT s.shop_code, ',' ORDER BY s.shop_code) AS shops
      FROM agg_exposure_machine c JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = c.shop_key
      GROUP BY m.serial ORDER BY m.serial`.execute(inc.db);
    expect(shops.rows).toEqual([
      { serial: "KDLV20001", shops: "S4,S5" },
      { serial: "KSKL20002", shops: "S4" },
      { serial: "KWRN20003", shops: "S4,S5" },
    ]);
    const lines = await sql<{ ro_number: string; serial: string; hour_valid: boolean; meter_generation: number }>`
      SELECT f.ro_number, m.serial, f.hour_valid, f.meter_generation FROM fact_repair_line f JOIN dim_machine m USING (machine_key)
      WHERE f.ro_number IN ('R-103', 'R-104', 'R-7') ORDER BY f.ro_number`.execute(inc.db);
    expect(lines.rows).toEqual([
      { ro_number: "R-103", serial: "KSKL20002", hour_valid: true, meter_generation: 0 }, // moved from KWRN-20003
      { ro_number: "R-104", serial: "KSKL20002", hour_valid: false, meter_generation: 0 }, // set aside when judged again
      { ro_number: "R-7", serial: "KDLV20001", hour_valid: true, meter_generation: 1 }, // the replaced meter's first reading
    ]);
  });
});
