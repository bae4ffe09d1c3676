/**
 * npm run bench:repairs [-- --runs 40 --concurrency 20 --rounds 3 --deep 0.8]
 * Measures the repairs list and its CSV on a warehouse that is already loaded (BENCH_PG_URL, e.g. a database
 * `npm run bench:api` created). The app runs in a process of its own on a loopback port; a group-wide
 * analyst's session is stored directly. Per round it prints p50/p95 of `/api/me` (the floor), of page 1 of
 * the list and of a deep page, then streams the CSV of the whole warehouse twice, compressed (gzip, as a
 * browser asks for some compression) and not, and prints its rows/s and the server's RSS before and
 * at its peak during the downloads. Beside them the COPY floor, measured right after in the same run:
 * PostgreSQL's COPY of as many repair lines (the fact table's own columns, nothing joined or sorted) through
 * the same driver (pg, pg-copy-streams) to /dev/null.
 * The deep page lies `--deep` of the way through the list: reached by following nextCursor (200 rows a step)
 * when the API offers cursors, by page number otherwise. The last table holds the medians of the rounds.
 */
import { Command } from "commander";
import { spawn } from "node:child_process";
import { createHmac, randomBytes } from "node:crypto";
import { createWriteStream } from "node:fs";
import { get, type IncomingMessage } from "node:http";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import { createGunzip } from "node:zlib";
import * as copyStreams from "pg-copy-streams";
import { median, quantile } from "d3-array";
import { createDb, type Db } from "../server/db/database.js";

const opts = new Command()
  .option("--runs <n>", "requests per route and round", "40")
  .option("--concurrency <n>", "requests in flight at once", "20")
  .option("--rounds <n>", "rounds (medians are printed at the end)", "3")
  .option("--deep <fraction>", "how far through the list the deep page lies", "0.8")
  .option("--page-size <n>", "rows per page measured", "25")
  .parse()
  .opts<{ runs: string; concurrency: string; rounds: string; deep: string; pageSize: string }>();

const url = process.env.BENCH_PG_URL;
if (!url) throw new Error("BENCH_PG_URL must name a loaded warehouse database");
const runs = Number(opts.runs);
const concurrency = Math.max(1, Number(opts.concurrency));
const pageSize = Number(opts.pageSize);

interface Page { total: number; totalIsEstimate?: boolean; rows: unknown[]; nextCursor?: string | null }

/** Stores a session for a group-wide analyst and returns the cookie express-session accepts for it. */
async function benchSession(db: Db, secret: string): Promise<string> {
  const sid = randomBytes(18).toString("base64url");
  const expire = new Date(Date.now() + 6 * 3600_000);
  const user = { sub: "bench-repairs", name: "Repairs bench", email: null, roles: ["analyst"], shops: [] };
  await db.insertInto("app_session").values({ sid, expire, sess: JSON.stringify({ cookie: { expires: expire.toISOString(), path: "/" }, user }) }).execute();
  const mac = createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "");
  return `ironledger.sid=${encodeURIComponent(`s:${sid}.${mac}`)}`;
}

// the app in a process of its own (scripts/bench/serve.ts), so its peak RSS is the server's alone
const { db, pool } = createDb(url);
const secret = randomBytes(16).toString("hex");
const server = spawn(process.execPath, ["--import", "tsx", path.join(import.meta.dirname, "bench/serve.ts")], {
  env: { ...process.env, BENCH_DB_URL: url, BENCH_SESSION_SECRET: secret },
  stdio: ["ignore", "pipe", "inherit"],
});
const port = await new Promise<number>((resolve, reject) => {
  server.stdout.on("data", (d: Buffer) => {
    const m = /listening (\d+)/.exec(d.toString());
    if (m) resolve(Number(m[1]));
  });
  server.once("exit", (code) => reject(new Error(`the app exited with ${code} before listening`)));
});
const origin = `http://127.0.0.1:${port}`;
const cookie = await benchSession(db, secret);
/** The server's resident memory now, or its peak so far (kB lines of /proc/PID/status), in MB. */
const serverMemory = async (field: "VmRSS" | "VmHWM") =>
  Number(new RegExp(`${field}:\\s+(\\d+)`).exec(await readFile(`/proc/${server.pid}/status`, "utf8"))?.[1] ?? 0) / 1000;

async function call(route: string): Promise<Response> {
  const res = await fetch(origin + route, { headers: { Cookie: cookie } });
  if (res.status !== 200) throw new Error(`${route} answered ${res.status}: ${await res.text()}`);
  return res;
}
const getPage = async (route: string) => (await (await call(route)).json()) as Page;

/** p50/p95 of `runs` requests with `concurrency` in flight. */
async function latency(route: string): Promise<{ p50: number; p95: number }> {
  const times: number[] = [];
  let started = 0;
  const worker = async () => {
    while (started++ < runs) {
      const t0 = performance.now();
      await (await call(route)).arrayBuffer();
      times.push(performance.now() - t0);
    }
  };
  await Promise.all(Array.from({ length: Math.min(runs, concurrency) }, worker));
  times.sort((a, b) => a - b);
  return { p50: quantile(times, 0.5) ?? 0, p95: quantile(times, 0.95) ?? 0 };
}

/** The route of the page `depth` rows into the list: by cursor when the API has them, by page number otherwise. */
async function deepRoute(depth: number): Promise<string> {
  let page = await getPage("/api/repairs?pageSize=200");
  if (page.nextCursor === undefined) return `/api/repairs?pageSize=${pageSize}&page=${Math.floor(depth / pageSize) + 1}`;
  let skipped = page.rows.length;
  while (page.nextCursor && skipped + 200 <= depth) {
    page = await getPage(`/api/repairs?pageSize=200&cursor=${page.nextCursor}`);
    skipped += page.rows.length;
  }
  if (!page.nextCursor) throw new Error(`the list ended after ${skipped} rows`);
  return `/api/repairs?pageSize=${pageSize}&cursor=${page.nextCursor}`;
}

/**
 * Streams the whole warehouse's CSV, counting records, while sampling the server's RSS: compressed (asking for
 * gzip, as a browser asks for some compression) or not. Read with node:http and node:zlib rather than fetch,
 * whose decompression cost this process several times the server's CPU on the same two cores.
 */
async function csvRun(encoding: "gzip" | "identity"): Promise<{ rows: number; seconds: number; mb: number; rssBeforeMb: number; peakRssMb: number }> {
  const rssBeforeMb = await serverMemory("VmRSS");
  let peak = rssBeforeMb;
  const sampler = setInterval(() => void serverMemory("VmRSS").then((mb) => (peak = Math.max(peak, mb))), 25);
  const t0 = performance.now();
  const res = await new Promise<IncomingMessage>((resolve, reject) => {
    get(`${origin}/api/repairs.csv`, { headers: { Cookie: cookie, "Accept-Encoding": encoding } }, resolve).on("error", reject);
  });
  if (res.statusCode !== 200) throw new Error(`/api/repairs.csv answered ${res.statusCode}`);
  if ((res.headers["content-encoding"] ?? "identity") !== encoding) throw new Error(`asked for ${encoding}, got ${res.headers["content-encoding"]}`);
  let crlf = 0;
  let bytes = 0;
  let lastByte = 0;
  for await (const chunk of (encoding === "gzip" ? res.pipe(createGunzip()) : res) as AsyncIterable<Buffer>) {
    bytes += chunk.length;
    for (let i = chunk.indexOf(10); i !== -1; i = chunk.indexOf(10, i + 1)) {
      if ((i > 0 ? chunk[i - 1] : lastByte) === 13) crlf++;
    }
    lastByte = chunk[chunk.length - 1] ?? lastByte;
  }
  const seconds = (performance.now() - t0) / 1000;
  clearInterval(sampler);
  return { rows: crlf - 1, seconds, mb: bytes / 1e6, rssBeforeMb, peakRssMb: peak };
}

/** Seconds for PostgreSQL to COPY `rows` repair lines, the fact table's own columns in CSV, to /dev/null through pg-copy-streams. */
async function floorRun(rows: number): Promise<number> {
  const client = await pool.connect();
  try {
    const t0 = performance.now();
    const copy = client.query(copyStreams.to(`COPY (
      SELECT repair_line_key, ro_number, line_no, opened_date, closed_date, line_type, pay_type, hour_meter, labor_hours, standard_hours,
             complaint, cause, part_number, supplier_lot
      FROM fact_repair_line LIMIT ${Math.max(0, Math.floor(rows))}) TO STDOUT (FORMAT csv, HEADER true)`));
    await pipeline(copy, createWriteStream("/dev/null"));
    return (performance.now() - t0) / 1000;
  } finally {
    client.release();
  }
}

const lines = Number((await db.selectFrom("fact_repair_line").select((eb) => eb.fn.countAll<string>().as("n")).executeTakeFirstOrThrow()).n);
const first = await getPage(`/api/repairs?pageSize=${pageSize}`);
const deep = await deepRoute(Math.floor(lines * Number(opts.deep)));
process.stdout.write(
  `${lines.toLocaleString("en-US")} repair lines; page 1 says total ${first.total.toLocaleString("en-US")}` +
    `${first.totalIsEstimate ? " (estimate)" : ""}; deep page: ${deep.length > 120 ? `${deep.slice(0, 117)}…` : deep}\n` +
    `${runs} requests per route and round, ${concurrency} in flight; server RSS at start ${(await serverMemory("VmRSS")).toFixed(0)} MB\n`,
);

const routes = { "/api/me (floor)": "/api/me", "page 1": `/api/repairs?pageSize=${pageSize}`, "deep page": deep };
type Row = Record<string, number>;
const rounds: Row[] = [];
const ms = (v: number) => `${v.toFixed(0)} ms`;
const print = (label: string, r: Row) => {
  const parts = Object.keys(routes).map((k) => `${k} p50 ${ms(r[`${k} p50`])} p95 ${ms(r[`${k} p95`])}`);
  process.stdout.write(
    `${label}: ${parts.join(" · ")} · CSV ${r.csvRows.toLocaleString("en-US")} rows ${r.csvMb.toFixed(0)} MB: compressed (gzip) ${r.csvSeconds.toFixed(1)} s = ` +
      `${Math.round(r.csvRowsPerSecond).toLocaleString("en-US")} rows/s, uncompressed ${r.plainSeconds.toFixed(1)} s = ${Math.round(r.plainRowsPerSecond).toLocaleString("en-US")} rows/s, ` +
      `against a COPY floor of ${Math.round(r.floorRowsPerSecond).toLocaleString("en-US")} rows/s (${((100 * r.csvRowsPerSecond) / r.floorRowsPerSecond).toFixed(0)} % / ` +
      `${((100 * r.plainRowsPerSecond) / r.floorRowsPerSecond).toFixed(0)} %), server RSS ${r.rssBeforeMb.toFixed(0)} → peak ${r.peakRssMb.toFixed(0)} MB · deep p95/floor ` +
      `${(r["deep page p95"] / r["/api/me (floor) p95"]).toFixed(1)}×, page 1 p95/floor ${(r["page 1 p95"] / r["/api/me (floor) p95"]).toFixed(1)}×\n`,
  );
};
for (let round = 1; round <= Number(opts.rounds); round++) {
  const row: Row = {};
  for (const [label, route] of Object.entries(routes)) {
    const f = await latency(route);
    row[`${label} p50`] = f.p50;
    row[`${label} p95`] = f.p95;
  }
  const csv = await csvRun("gzip");
  const plain = await csvRun("identity");
  const floorSeconds = await floorRun(csv.rows);
  Object.assign(row, {
    csvRows: csv.rows, csvMb: plain.mb, csvSeconds: csv.seconds, csvRowsPerSecond: csv.rows / csv.seconds,
    plainSeconds: plain.seconds, plainRowsPerSecond: plain.rows / plain.seconds, floorRowsPerSecond: csv.rows / floorSeconds,
    rssBeforeMb: Math.min(csv.rssBeforeMb, plain.rssBeforeMb), peakRssMb: Math.max(csv.peakRssMb, plain.peakRssMb),
  });
  rounds.push(row);
  print(`round ${round}`, row);
}
const medians: Row = Object.fromEntries(Object.keys(rounds[0]).map((k) => [k, median(rounds.map((r) => r[k])) ?? 0]));
print(`median of ${rounds.length}`, medians);
server.kill("SIGTERM");
await db.destroy();
process.exit(0);
