import { execFile } from "node:child_process";
import { readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { promisify } from "node:util";
import type pg from "pg";

const here = path.dirname(fileURLToPath(import.meta.url));
export const fixture = (name: string) => path.join(here, "fixtures", name);
export const sample = (name: string) => path.resolve(here, "../../etl/samples", name);

/** Runs the ETL CLI (`npm run etl -- …`) against the database at `url`; never throws, returns its exit code and output. */
export async function runEtlCli(url: string, args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const r = await promisify(execFile)(process.execPath, ["--import", "tsx", "etl/cli.ts", ...args], {
      cwd: path.resolve(here, "../.."),
      env: { ...process.env, DATABASE_URL: url },
    });
    return { code: 0, ...r };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

/** A fixed "today" so the fixtures' dates stay in the past and 2052/2099 stay in the future. */
export const TODAY = "2025-06-30";

const WAREHOUSE_TABLES = [
  "dim_shop", "dim_component", "dim_failure_mode", "dim_date", "dim_machine", "dim_technician", "dim_part", "fact_repair_line",
  "fact_repair_line_history", "fact_fault_code", "fact_measurement", "fact_hour_reading", "fact_weather_day", "etl_reject",
];

/** Every warehouse table's full contents (not just counts), in a stable order, for before/after comparisons. */
export async function snapshot(pool: pg.Pool): Promise<Record<string, unknown[]>> {
  const out: Record<string, unknown[]> = {};
  for (const t of WAREHOUSE_TABLES) {
    const r = await pool.query(`SELECT to_jsonb(t)::text AS row FROM ${t} t ORDER BY 1`);
    out[t] = r.rows.map((x) => x.row);
  }
  return out;
}

export async function count(pool: pg.Pool, table: string): Promise<number> {
  const r = await pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM ${table}`);
  return r.rows[0].n;
}

export async function rejectsOf(pool: pg.Pool, batchId: number): Promise<{ row_number: number; reason_code: string; reason: string; raw_row: Record<string, string> }[]> {
  const r = await pool.query(`SELECT row_number, reason_code, reason, raw_row FROM etl_reject WHERE batch_id = $1 ORDER BY row_number`, [batchId]);
  return r.rows;
}

/**
 * Ends the test's pool before dropping its database: these tests use the pg pool directly, and Kysely only
 * ends a pool it has used, so idle clients would otherwise be killed by DROP … WITH (FORCE).
 */
export async function dropTestDb(t: { pool: pg.Pool; drop(): Promise<void> }): Promise<void> {
  await t.pool.end();
  await t.drop();
}

/** Splits a CSV line of the samples (no quoted fields in them). */
const cells = (line: string) => line.split(",");

/**
 * A jobs export of `rows` lines built from the generic sample: its repair lines repeated with new RO numbers,
 * spread over the machines the warehouse knows (at their home shops), one day for every hundred lines of a
 * machine and hour meters that only go up, so every row is an ordinary line rather than a reject.
 */
export function bigJobsFile(file: string, rows: number, machines: { serial: string; shop: string; hours: number }[]): void {
  const [head, ...sampleRows] = readFileSync(sample("generic-jobs.csv"), "utf8").trim().split("\n").map(cells);
  const col = (name: string) => {
    const i = head.indexOf(name);
    if (i < 0) throw new Error(`generic-jobs.csv has no column ${name}`);
    return i;
  };
  // lines with every column and a plausible labour figure serve as templates
  const templates = sampleRows.filter((r) => r.length === head.length && Number(r[col("labor_hours")]) > 0);
  if (templates.length < 2) throw new Error("generic-jobs.csv has too few complete lines to serve as templates");
  const start = Date.UTC(2024, 0, 1);
  const out: string[] = [head.join(",")];
  for (let i = 0; i < rows; i++) {
    const m = machines[i % machines.length];
    const nth = Math.floor(i / machines.length);
    const day = (offset: number) => new Date(start + (Math.floor(nth / 100) + offset) * 86_400_000).toISOString().slice(0, 10);
    const r = [...templates[i % templates.length]];
    r[col("shop_code")] = m.shop;
    r[col("ro_number")] = `K-${i}`;
    r[col("line_no")] = "1";
    r[col("serial")] = m.serial;
    r[col("opened_date")] = day(0);
    r[col("closed_date")] = day(1);
    r[col("hour_meter")] = (m.hours + nth * 0.1).toFixed(1);
    r[col("part_ordered_date")] = day(0);
    r[col("part_received_date")] = day(1);
    out.push(r.join(","));
  }
  writeFileSync(file, out.join("\n") + "\n");
}

