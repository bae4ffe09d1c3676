/**
 * npm run bench:scale [-- --lines N] [--connections C] [--seconds S] [--fresh] [--build-only] [--skip-full]
 *
 * A warehouse of N job lines (default 10,000,000): the demo world at scale 1 loaded through the ETL, its fleet
 * then copied in SQL until it holds N lines (scripts/bench/amplify.ts: same distributions, far faster than
 * loading that volume through the ETL — bench:etl measures the ETL against a raw COPY on its own), and the
 * derived tables rebuilt. Then, in one run, it prints: build time; ETL rows/s against a raw COPY; the
 * incremental refresh after a shop's ≈5,000-line monthly export against a full rebuild; the cold first call
 * and the p50/p95 of every route under C concurrent connections with /api/me beside them (the floor); the
 * cluster finder's cold time; the repairs CSV's rows/s; peak RSS of the server and of the ETL; database size.
 * The database (ironledger_scale_<N>) is kept, so a second run starts at the measurements (--fresh rebuilds).
 * Needs the project's PostgreSQL (npm start's, on PGPORT) or BENCH_PG_URL.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createHmac, randomBytes } from "node:crypto";
import { readFileSync, mkdirSync } from "node:fs";
import path from "node:path";
import { createInterface } from "node:readline";
import { Command } from "commander";
import pg from "pg";
import { Kysely, PostgresDialect } from "kysely";
import { loadFile, refreshExposure } from "../etl/index.js";
import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { loadDemo, warehouseIsEmpty } from "../server/demo/load-demo.js";
import { amplifyWarehouse } from "./bench/amplify.js";
import { loadRoute, timedGet, type RouteFigures } from "./bench/http-load.js";
import { writeMonthlyExport } from "./bench/monthly-export.js";
import { WARM_REQUESTS } from "../server/services/answer-warmer.js";

const o = new Command()
  .option("--lines <n>", "job lines in the warehouse", (v) => Number(v), 10_000_000)
  .option("--connections <n>", "concurrent connections per route", (v) => Number(v), 20)
  .option("--seconds <n>", "seconds of load per route", (v) => Number(v), 10)
  .option("--fresh", "drop and build the warehouse again")
  .option("--build-only", "build the warehouse (if missing) and stop before the measurements")
  .option("--skip-full", "skip the full rebuild after the load (the build prints one)")
  .parse()
  .opts<{ lines: number; connections: number; seconds: number; fresh?: boolean; buildOnly?: boolean; skipFull?: boolean }>();

const config = loadConfig();
const base = new URL(process.env.BENCH_PG_URL ?? config.databaseUrl);
const dbName = `ironledger_scale_${o.lines}`;
const urlFor = (name: string) => Object.assign(new URL(base), { pathname: `/${name}` }).toString();
const s = (ms: number) => (ms / 1000).toFixed(1);
const ms = (v: number) => (Number.isFinite(v) ? Math.round(v).toLocaleString("en-US") : "–");
const log = (line: string) => process.stdout.write(line + "\n");
const workDir = path.join(config.dataDir, "bench-scale");
mkdirSync(workDir, { recursive: true });

async function ensureDatabase(): Promise<boolean> {
  const admin = new pg.Client({ connectionString: urlFor("postgres") });
  await admin.connect();
  try {
    if (o.fresh) await admin.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
    const exists = await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [dbName]);
    if (exists.rowCount === 0) await admin.query(`CREATE DATABASE ${dbName}`);
    return exists.rowCount === 0;
  } finally {
    await admin.end();
  }
}

/** Peak resident memory of a process in MB (VmHWM), from /proc. */
function peakRssMb(pid: number): number {
  const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
  return m ? Number(m[1]) / 1024 : NaN;
}

/** Resident memory of a process now, in MB (VmRSS). */
function rssMb(pid: number): number {
  const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
  return m ? Number(m[1]) / 1024 : NaN;
}

/** The app in a child process of its own; resolves with its origin once it listens. */
async function startServer(url: string, secret: string): Promise<{ origin: string; child: ChildProcess }> {
  const child = spawn(process.execPath, ["--import", "tsx", path.join(import.meta.dirname, "bench", "serve.ts")], {
    env: { ...process.env, BENCH_DB_URL: url, BENCH_SESSION_SECRET: secret, LOG_LEVEL: "silent", NODE_ENV: "production" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  const lines = createInterface({ input: child.stdout! });
  for await (const line of lines) {
    const m = /^listening (\d+)$/.exec(line);
    if (m) return { origin: `http://127.0.0.1:${m[1]}`, child };
  }
  throw new Error("the benchmark server stopped before it listened");
}

async function sessionCookie(pool: pg.Pool, secret: string, roles: string[], shops: string[]): Promise<string> {
  const sid = randomBytes(16).toString("hex");
  const expires = new Date(Date.now() + 6 * 3600_000);
  const sess = { cookie: { expires: expires.toISOString(), path: "/" }, user: { sub: `bench-${sid.slice(0, 6)}`, name: "Bench", email: null, roles, shops } };
  await pool.query("INSERT INTO app_session (sid, sess, expire) VALUES ($1, $2, $3)", [sid, JSON.stringify(sess), expires]);
  return `ironledger.sid=${encodeURIComponent(`s:${sid}.${createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "")}`)}`;
}

// the floor, the pages' answers the server precomputes after loads (the cluster list before the overview, which
// runs the same scan: its cold figure is the finder's own), and the repairs list
const routes = ["/api/me", ...WARM_REQUESTS, "/api/repairs"];

async function main() {
  const started = Date.now();
  const created = await ensureDatabase();
  const url = urlFor(dbName);
  const { db, pool } = createDb(url, 10);
  await migrateToLatest(db);
  const kdb = new Kysely<any>({ dialect: new PostgresDialect({ pool }) });
  const figures: [string, string][] = [];
  try {
    if (created || (await warehouseIsEmpty(db))) {
      log(`Building a warehouse of ${o.lines.toLocaleString("en-US")} job lines in ${dbName}…`);
      const demo = await loadDemo(db, pool, { dir: path.join(workDir, "demo-x1"), scale: 1, log: () => {} });
      log(`  demo world through the ETL: ${demo.read.toLocaleString("en-US")} rows in ${demo.seconds.toFixed(0)} s`);
      const baseLines = Number((await pool.query<{ n: string }>("SELECT count(*)::text AS n FROM fact_repair_line")).rows[0].n);
      const copies = Math.max(1, Math.round(o.lines / baseLines));
      const n = await amplifyWarehouse(pool, copies, log);
      const full = await refreshExposure(kdb, { full: true });
      log(`  ${n.toLocaleString("en-US")} job lines; exposure rebuilt in ${full.seconds.toFixed(1)} s`);
      figures.push(["build (demo load + copies + full exposure rebuild)", `${s(Date.now() - started)} s`]);
    }
    const lines = Number((await pool.query<{ n: string }>("SELECT count(*)::text AS n FROM fact_repair_line")).rows[0].n);
    figures.unshift(["job lines in the warehouse", lines.toLocaleString("en-US")]);
    if (o.buildOnly) {
      log(`${lines.toLocaleString("en-US")} job lines in ${dbName}; measurements skipped (--build-only).`);
      return;
    }

    const secret = randomBytes(16).toString("hex");
    const analyst = await sessionCookie(pool, secret, ["analyst"], []);
    const { origin, child } = await startServer(url, secret);
    try {
      log("Cold first calls after a server start…");
      const cold = new Map<string, number>();
      for (const r of routes) cold.set(r, await timedGet(origin, r, analyst));
      // routes whose address comes from another answer: a cluster's detail, a deep repairs page (30 pages in)
      const clusters = (await (await fetch(`${origin}/api/analytics/clusters`, { headers: { Cookie: analyst } })).json()) as { clusters: { id: string }[] };
      if (clusters.clusters[0]) routes.push(`/api/analytics/clusters/${clusters.clusters[0].id}`);
      let page = (await (await fetch(`${origin}/api/repairs`, { headers: { Cookie: analyst } })).json()) as { nextCursor: string | null };
      for (let i = 0; i < 30 && page.nextCursor; i++) {
        const next = `/api/repairs?cursor=${encodeURIComponent(page.nextCursor)}`;
        page = (await (await fetch(origin + next, { headers: { Cookie: analyst } })).json()) as { nextCursor: string | null };
        if (i === 29 || !page.nextCursor) routes.push(next);
      }
      for (const r of routes.filter((x) => !cold.has(x))) cold.set(r, await timedGet(origin, r, analyst));
      figures.push(["cluster finder, cold (first call after start)", `${ms(cold.get("/api/analytics/clusters")!)} ms`]);

      figures.push(["server RSS after the cold calls", `${rssMb(child.pid!).toFixed(0)} MB`]);
      log(`Each route for ${o.seconds} s with ${o.connections} connections…`);
      const warm: RouteFigures[] = [];
      for (const r of routes) warm.push(await loadRoute(origin, r, analyst, o.connections, o.seconds));

      figures.push(["server RSS after the loaded runs", `${rssMb(child.pid!).toFixed(0)} MB (peak so far ${peakRssMb(child.pid!).toFixed(0)} MB)`]);
      log("The whole repairs CSV…");
      const t0 = performance.now();
      const res = await fetch(`${origin}/api/repairs.csv`, { headers: { Cookie: analyst } });
      let csvRows = -1; // the header
      let bytes = 0;
      for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
        bytes += chunk.length;
        for (const b of chunk) if (b === 10) csvRows++;
      }
      const csvSeconds = (performance.now() - t0) / 1000;
      figures.push(["repairs CSV, whole warehouse", `${csvRows.toLocaleString("en-US")} rows, ${(bytes / 1e6).toFixed(0)} MB in ${csvSeconds.toFixed(1)} s = ${Math.round(csvRows / csvSeconds).toLocaleString("en-US")} rows/s`]);

      log("A shop's monthly export, loaded and folded in…");
      const file = path.join(workDir, `monthly-${o.lines}-${Date.now()}.csv`);
      const exp = await writeMonthlyExport(pool, file, 5000);
      const rssBefore = process.resourceUsage().maxRSS;
      const tl = performance.now();
      const batch = await loadFile(pool, { path: file, loadedBy: "bench" });
      const loadSeconds = (performance.now() - tl) / 1000;
      const inc = await refreshExposure(kdb);
      figures.push([`monthly export (${exp.shop}, ${exp.month}, ${exp.rows} lines)`, `loaded in ${loadSeconds.toFixed(1)} s (${Math.round(batch.read / loadSeconds)} rows/s; ${batch.inserted} inserted, ${batch.rejected} rejected)`]);
      figures.push(["incremental refresh after it", `${inc.seconds.toFixed(1)} s`]);
      const coldAfter = new Map<string, number>();
      const refreshed = performance.now();
      for (const r of routes) coldAfter.set(r, await timedGet(origin, r, analyst));
      figures.push(["every route answered, from the end of the refresh", `${((performance.now() - refreshed) / 1000).toFixed(1)} s`]);
      if (o.skipFull) figures.push(["full rebuild, for comparison", "skipped (--skip-full): see the build's figure"]);
      else {
        const full = await refreshExposure(kdb, { full: true });
        figures.push(["full rebuild, for comparison", `${full.seconds.toFixed(1)} s`]);
      }
      figures.push(["ETL peak RSS (this process)", `${(Math.max(rssBefore, process.resourceUsage().maxRSS) / 1024).toFixed(0)} MB`]);
      figures.push(["server peak RSS", `${peakRssMb(child.pid!).toFixed(0)} MB`]);

      const size = await pool.query<{ s: string }>("SELECT pg_size_pretty(pg_database_size(current_database())) AS s");
      figures.push(["database size", size.rows[0].s]);

      const floor = warm[0].p95;
      log("");
      log(`| route | cold after start (ms) | cold after a load (ms) | p50 (ms) | p95 (ms) | p95 ÷ /api/me p95 | requests | errors |`);
      log(`|---|---:|---:|---:|---:|---:|---:|---:|`);
      for (const w of warm) {
        log(`| ${w.route.replace(/cursor=[^&]+/, "cursor=(31st page)")} | ${ms(cold.get(w.route)!)} | ${ms(coldAfter.get(w.route)!)} | ${ms(w.p50)} | ${ms(w.p95)} | ${(w.p95 / floor).toFixed(1)}× | ${w.requests} | ${w.errors} |`);
      }
      log("");
      for (const [k, v] of figures) log(`- ${k}: ${v}`);
    } finally {
      child.kill("SIGTERM");
    }
  } finally {
    await db.destroy();
  }
}

await main();
