// npm run bench:etl [-- --rows N] [--machines M]
// Generates a synthetic generic-layout jobs export (machines first), loads it through the ETL into an empty
// database, then loads the same rows, already normalised, with a plain COPY into an identical table.
// Prints rows/s for both, their ratio and the ETL's peak RSS; a second ETL run on a file a tenth the size
// shows whether peak memory grows with file size. Uses its own database on the cluster of DATABASE_URL.
import { createReadStream, createWriteStream, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { once } from "node:events";
import { pipeline } from "node:stream/promises";
import { Command } from "commander";
import pg from "pg";
import * as copyStreams from "pg-copy-streams";
import { layouts, loadFile } from "../etl/index.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { components } from "../shared/catalog.js";

const opts = new Command()
  .option("--rows <n>", "job lines", (v) => Number(v), 1_000_000)
  .option("--machines <n>", "machines in the fleet", (v) => Number(v), 4000)
  .parse()
  .opts<{ rows: number; machines: number }>();

const baseUrl = process.env.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${process.env.PGPORT ?? "54329"}/ironledger`;
const dbName = "ironledger_bench_etl";
const urlFor = (db: string) => {
  const u = new URL(baseUrl);
  u.pathname = `/${db}`;
  return u.toString();
};

async function writeLines(file: string, lines: Iterable<string>): Promise<void> {
  const out = createWriteStream(file);
  for (const l of lines) if (!out.write(l)) await once(out, "drain");
  out.end();
  await once(out, "finish");
}

const models = ["WRN", "DLV", "SKL", "TMB", "TRN", "GRS"];
const serial = (i: number) => `BM-${String(i).padStart(6, "0")}`;

function* machineRows(n: number): Generator<string> {
  yield layouts.machines.join(",") + "\n";
  for (let i = 0; i < n; i++) {
    yield `${serial(i)},${models[i % models.length]},E-${i},2014-03-01,2014-05-01,1.0,S${(i % 8) + 1},QL-${1400 + (i % 50)},N,,24,2000,36,3000\n`;
  }
}

/** Job lines spread over the fleet; each machine's ROs move forward a week and 30 h at a time. */
function* jobRows(rows: number, machines: number, roPrefix: string): Generator<string> {
  yield layouts.jobs.join(",") + "\n";
  const start = Date.UTC(2015, 0, 1);
  for (let r = 0; r < rows; r++) {
    const m = r % machines;
    const visit = Math.floor(r / machines);
    const opened = new Date(start + visit * 7 * 86400000).toISOString().slice(0, 10);
    const closed = new Date(start + (visit * 7 + 1) * 86400000).toISOString().slice(0, 10);
    const comp = components[r % components.length].code;
    const part = r % 2 === 0 ? `HP-${r % 997},Part ${r % 997},1,QL-${r % 50},${opened},${closed}` : ",,,,,";
    const fault = r % 10 === 0 ? "520210-5" : "";
    yield `S${(m % 8) + 1},${roPrefix}${r},1,${serial(m)},${opened},${closed},${(visit * 30 + 2).toFixed(1)},,Complaint ${r % 13},Cause ${r % 7},` +
      `Correction ${r % 5},${comp},WEAR,OP-${r % 40},1.5,1.7,${(r % 500) + 0.5},${(r % 300) + 0.25},customer,${comp === "SVC-PM" ? "pm" : "failure"},` +
      `S${(m % 8) + 1}-T${r % 6},${part},N,${fault},${(r % 40) - 10}\n`;
  }
}

async function measureEtl(pool: pg.Pool, file: string): Promise<{ seconds: number; rows: number; peakRss: number }> {
  let peak = process.memoryUsage().rss;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 50);
  const t0 = process.hrtime.bigint();
  try {
    const s = await loadFile(pool, { path: file, loadedBy: "bench" });
    const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
    if (s.rejected > 0 || s.inserted !== s.read) throw new Error(`bench rows were not all inserted: ${JSON.stringify(s)}`);
    return { seconds, rows: s.read, peakRss: Math.max(peak, process.memoryUsage().rss) };
  } finally {
    clearInterval(timer);
  }
}

const FACT_COLUMNS_SQL = `SELECT string_agg(quote_ident(column_name), ', ' ORDER BY ordinal_position) AS cols
  FROM information_schema.columns WHERE table_name = 'fact_repair_line' AND is_generated = 'NEVER'`;

async function main(): Promise<void> {
  const admin = new pg.Client({ connectionString: urlFor("postgres") });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${dbName}`);
  await admin.end();
  const { db, pool } = createDb(urlFor(dbName), 2);
  await migrateToLatest(db);

  const dir = mkdtempSync(path.join(os.tmpdir(), "bench-etl-"));
  try {
    const machinesFile = path.join(dir, "machines.csv");
    const jobsFile = path.join(dir, "jobs.csv");
    const smallFile = path.join(dir, "jobs-small.csv");
    const rawFile = path.join(dir, "normalised.tsv");
    process.stderr.write(`generating ${opts.machines} machines and ${opts.rows} job lines in ${dir}\n`);
    await writeLines(machinesFile, machineRows(opts.machines));
    await writeLines(jobsFile, jobRows(opts.rows, opts.machines, "RO"));
    await writeLines(smallFile, jobRows(Math.max(1, Math.floor(opts.rows / 10)), opts.machines, "SM"));
    await loadFile(pool, { path: machinesFile, loadedBy: "bench" });

    const rssBefore = process.memoryUsage().rss;
    process.stderr.write("loading through the ETL…\n");
    const etl = await measureEtl(pool, jobsFile);

    // the same rows, normalised exactly as the ETL stored them, into an identical empty table by plain COPY
    const { cols } = (await pool.query<{ cols: string }>(FACT_COLUMNS_SQL)).rows[0];
    const client = await pool.connect();
    let rawSeconds: number;
    let rawRows: number;
    try {
      await pipeline(client.query(copyStreams.to(`COPY (SELECT ${cols} FROM fact_repair_line) TO STDOUT`)), createWriteStream(rawFile));
      await client.query(`CREATE TABLE bench_raw_repair_line (LIKE fact_repair_line INCLUDING ALL)`);
      process.stderr.write("loading the normalised rows with plain COPY…\n");
      const t0 = process.hrtime.bigint();
      const stream = client.query(copyStreams.from(`COPY bench_raw_repair_line (${cols}) FROM STDIN`));
      await pipeline(createReadStream(rawFile, { highWaterMark: 1 << 16 }), stream);
      rawSeconds = Number(process.hrtime.bigint() - t0) / 1e9;
      rawRows = Number(stream.rowCount);
    } finally {
      client.release();
    }

    process.stderr.write("loading a file a tenth the size through the ETL, for memory…\n");
    const small = await measureEtl(pool, smallFile);

    const mb = (b: number) => `${(b / 1048576).toFixed(0)} MB`;
    const etlRate = etl.rows / etl.seconds;
    const rawRate = rawRows / rawSeconds;
    const report = {
      rows: etl.rows,
      etlSeconds: Number(etl.seconds.toFixed(2)),
      etlRowsPerSecond: Math.round(etlRate),
      rawCopySeconds: Number(rawSeconds.toFixed(2)),
      rawCopyRowsPerSecond: Math.round(rawRate),
      ratio: Number((etlRate / rawRate).toFixed(3)),
      etlPeakRss: mb(etl.peakRss),
      rssBeforeLoad: mb(rssBefore),
      smallFileRows: small.rows,
      smallFilePeakRss: mb(small.peakRss),
    };
    console.log(
      [
        `ETL:       ${report.rows.toLocaleString("en-US")} rows in ${report.etlSeconds} s = ${report.etlRowsPerSecond.toLocaleString("en-US")} rows/s`,
        `raw COPY:  ${rawRows.toLocaleString("en-US")} rows in ${report.rawCopySeconds} s = ${report.rawCopyRowsPerSecond.toLocaleString("en-US")} rows/s`,
        `ratio:     ${(report.ratio * 100).toFixed(1)} % of raw COPY (goal ≥ 50 %)`,
        `peak RSS:  ${report.etlPeakRss} for ${report.rows.toLocaleString("en-US")} rows, ${report.smallFilePeakRss} for ${report.smallFileRows.toLocaleString("en-US")} rows (${report.rssBeforeLoad} before loading)`,
      ].join("\n"),
    );
    console.log(JSON.stringify(report));
  } finally {
    if (!process.env.BENCH_KEEP) rmSync(dir, { recursive: true, force: true });
    await db.destroy();
  }
}

await main();
