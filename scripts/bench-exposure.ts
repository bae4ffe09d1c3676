/**
 * npm run bench:exposure [-- --runs 5 --lines 5000]
 * Times the exposure refresh on BENCH_PG_URL, a loaded warehouse (e.g. a database `npm run bench:api`
 * built), in a scratch copy of it: `runs` full rebuilds, then `runs` times: load one monthly jobs export of
 * about `lines` lines (the warehouse's latest lines, moved into the month after its last one, with new
 * repair-order numbers and hour meters going on from each machine's last reading) and fold it in with the
 * incremental refresh. Prints each run and the medians, then whether the aggregates the incremental runs
 * left equal a full rebuild. The scratch copy is dropped at the end; the warehouse itself is only migrated
 * (and, the first time, given a full refresh so that copies start current).
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { Command } from "commander";
import { stringify } from "csv-stringify/sync";
import { median } from "d3-array";
import { sql } from "kysely";
import pg from "pg";
import { layouts, loadFile, refreshExposure } from "../etl/index.js";
import { createDb, type Db } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";

const opts = new Command()
  .option("--runs <n>", "full rebuilds, and monthly exports folded in", (v) => Number(v), 5)
  .option("--lines <n>", "job lines per monthly export", (v) => Number(v), 5000)
  .parse()
  .opts<{ runs: number; lines: number }>();

if (!process.env.BENCH_PG_URL) {
  process.stderr.write("Set BENCH_PG_URL to a loaded warehouse, e.g. postgres://postgres@127.0.0.1:54329/ironledger_bench_x1\n");
  process.exit(2);
}
const base = new URL(process.env.BENCH_PG_URL);
const scratchName = `${base.pathname.slice(1)}_exposure_bench`;
const urlOf = (name: string) => Object.assign(new URL(base), { pathname: `/${name}` }).toString();

async function admin(statement: string): Promise<void> {
  const c = new pg.Client({ connectionString: urlOf("postgres") });
  await c.connect();
  try {
    await c.query(statement);
  } finally {
    await c.end();
  }
}

/** The next month's export: the latest `lines` lines, their days spread over the month after the last line's. */
async function writeNextMonth(db: Db, file: string, lines: number): Promise<{ month: string; rows: number }> {
  const r = await sql<Record<string, unknown>>`
    WITH src AS (
      SELECT * FROM fact_repair_line ORDER BY opened_date DESC, repair_line_key LIMIT ${lines}
    ), frame AS (
      SELECT (date_trunc('month', max(opened_date)::timestamp) + interval '1 month')::date AS month,
             min(opened_date) AS first, greatest(max(opened_date) - min(opened_date), 1) AS span
      FROM src
    ), moved AS (
      SELECT src.*, frame.month, frame.month + (src.opened_date - frame.first) * 27 / frame.span - src.opened_date AS shift
      FROM src, frame
    ), meter AS (
      SELECT DISTINCT ON (machine_key) machine_key, reading_date, hours FROM fact_hour_reading
      WHERE valid AND machine_key IN (SELECT machine_key FROM src)
      ORDER BY machine_key, reading_date DESC, hours DESC
    )
    SELECT s.shop_code, 'N' || to_char(f.month, 'YYMM') || '-' || f.ro_number AS ro_number, f.line_no, m.serial,
           (f.opened_date + f.shift)::text AS opened_date, (f.closed_date + f.shift)::text AS closed_date,
           round(r.hours + 8 * (f.opened_date + f.shift - r.reading_date), 1) AS hour_meter, NULL AS meter_note,
           f.complaint, f.cause, f.correction, c.component_code, fm.failure_mode_code AS failure_mode, f.labor_op,
           f.standard_hours, f.labor_hours, f.parts_cost, f.labor_cost, f.pay_type, f.line_type, t.tech_id, f.part_number,
           f.part_description, f.part_qty, f.supplier_lot, (f.part_ordered_date + f.shift)::text AS part_ordered_date,
           (f.part_received_date + f.shift)::text AS part_received_date, CASE WHEN f.back_ordered THEN 'Y' ELSE 'N' END AS back_ordered,
           NULL AS fault_codes, f.ambient_temp_c AS ambient_temp, to_char(f.month, 'YYYY-MM') AS export_month
    FROM moved f
    JOIN dim_shop s USING (shop_key) JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
    LEFT JOIN dim_failure_mode fm USING (failure_mode_key) LEFT JOIN dim_technician t USING (technician_key)
    LEFT JOIN meter r USING (machine_key)
  `.execute(db);
  writeFileSync(file, stringify(r.rows, { header: true, columns: [...layouts.jobs] }));
  return { month: String(r.rows[0]?.export_month), rows: r.rows.length };
}

/** Rows of agg_exposure and agg_exposure_fleet that differ between now and the snapshot tables bench_agg / bench_fleet. */
async function differingRows(db: Db): Promise<number> {
  const differs = (a: string, b: string) =>
    sql`${sql.ref(`${a}.machine_days`)} IS DISTINCT FROM ${sql.ref(`${b}.machine_days`)}
        OR NOT abs(${sql.ref(`${a}.engine_hours`)} - ${sql.ref(`${b}.engine_hours`)})
               <= 1e-6 * greatest(abs(${sql.ref(`${a}.engine_hours`)}), abs(${sql.ref(`${b}.engine_hours`)})) + 1e-9`;
  const r = await sql<{ n: number }>`
    SELECT (SELECT count(*) FROM agg_exposure e FULL JOIN bench_agg o
              USING (engine_family, model_line, build_month, lot, shop_key, month, temp_band, hour_band) WHERE ${differs("e", "o")})
         + (SELECT count(*) FROM agg_exposure_fleet e FULL JOIN bench_fleet o
              USING (engine_family, model_line, shop_key, month, temp_band, hour_band) WHERE ${differs("e", "o")}) AS n
  `.execute(db);
  return Number(r.rows[0].n);
}

const secs = (v: number) => `${v.toFixed(2)} s`.padStart(9);

{
  const { db } = createDb(urlOf(base.pathname.slice(1)));
  await migrateToLatest(db);
  const state = await sql`SELECT 1 FROM agg_refresh WHERE name = 'exposure'`.execute(db);
  if (state.rows.length === 0) {
    process.stdout.write("First refresh of the warehouse since its migration: a full rebuild…\n");
    await refreshExposure(db, { full: true });
  }
  await db.destroy();
}
await admin(`DROP DATABASE IF EXISTS ${scratchName} WITH (FORCE)`);
await admin(`CREATE DATABASE ${scratchName} TEMPLATE ${base.pathname.slice(1)}`);
const { db, pool } = createDb(urlOf(scratchName));
const dir = mkdtempSync(path.join(os.tmpdir(), "bench-exposure-"));
try {
  const counts = await sql<{ machines: number; lines: number }>`
    SELECT (SELECT count(*) FROM dim_machine)::integer AS machines, (SELECT count(*) FROM fact_repair_line)::integer AS lines
  `.execute(db);
  process.stdout.write(`${scratchName}: ${counts.rows[0].machines.toLocaleString("en-US")} machines, ${counts.rows[0].lines.toLocaleString("en-US")} repair lines\n\n`);

  const full: number[] = [];
  for (let i = 0; i < opts.runs; i++) {
    const r = await refreshExposure(db, { full: true });
    full.push(r.seconds);
    process.stdout.write(`full rebuild ${i + 1}: ${secs(r.seconds)}  (${r.rows.toLocaleString("en-US")} rows)\n`);
  }

  const incremental: number[] = [];
  for (let i = 0; i < opts.runs; i++) {
    const file = path.join(dir, `jobs-${i}.csv`);
    const exported = await writeNextMonth(db, file, opts.lines);
    const loaded = await loadFile(pool, { path: file, loadedBy: "bench", today: "2099-12-31" });
    const r = await refreshExposure(db);
    incremental.push(r.seconds);
    process.stdout.write(
      `export ${exported.month} (${exported.rows} lines; load ${(loaded.durationMs / 1000).toFixed(1)} s, ` +
        `${loaded.inserted} inserted, ${loaded.rejected} rejected): incremental refresh ${secs(r.seconds)}, ${r.machines} machines\n`,
    );
  }

  await sql`CREATE TABLE bench_agg AS SELECT * FROM agg_exposure`.execute(db);
  await sql`CREATE TABLE bench_fleet AS SELECT * FROM agg_exposure_fleet`.execute(db);
  await refreshExposure(db, { full: true });
  const differing = await differingRows(db);

  process.stdout.write(`\nmedian of ${opts.runs}: full rebuild ${secs(median(full) ?? 0)}, incremental after a ${opts.lines}-line export ${secs(median(incremental) ?? 0)}\n`);
  process.stdout.write(`aggregates after the incremental runs ${differing === 0 ? "equal a full rebuild" : `differ from a full rebuild in ${differing} rows`}\n`);
} finally {
  await db.destroy();
  rmSync(dir, { recursive: true, force: true });
  await admin(`DROP DATABASE IF EXISTS ${scratchName} WITH (FORCE)`);
}
