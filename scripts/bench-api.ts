/**
 * npm run bench:api [-- --scales 1,5 --runs 10 --concurrency 1 --rounds 1]
 * Loads the demo world at each scale into its own database on the local cluster (kept for the next run),
 * then calls the analytics routes over HTTP on a loopback port and prints, per route, the first call
 * and the median and p95 latency of the repeats (`concurrency` requests in flight at once), with
 * `/api/me` measured the same way as the floor and each route's p95 as a multiple of it. Every route
 * gets an app and connection pool of its own, so its first call finds the in-process caches empty (the
 * first call after a load). With `--rounds R` the whole table is measured R times and the medians printed.
 * Needs the project's PostgreSQL (npm start's, on PGPORT) running, or BENCH_PG_URL pointing at a server
 * where databases may be created.
 */
import { Command } from "commander";
import pg from "pg";
import path from "node:path";
import type { AddressInfo } from "node:net";
import { createHmac, randomBytes } from "node:crypto";
import { median, quantile } from "d3-array";
import { loadConfig } from "../server/config.js";
import { createDb, type Db } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { loadDemo, warehouseIsEmpty } from "../server/demo/load-demo.js";
import { createApp } from "../server/app.js";
import { createOidcClient } from "../server/auth/oidc-client.js";

const opts = new Command()
  .option("--scales <list>", "demo scales", "1,5")
  .option("--runs <n>", "repeats per route after the first call", "20")
  .option("--concurrency <n>", "requests in flight at once during the repeats", "1")
  .option("--rounds <n>", "measure the whole table this many times and print medians", "1")
  .option("--only <text>", "measure only routes whose path contains this text (and /api/me)")
  .parse()
  .opts<{ scales: string; runs: string; concurrency: string; rounds: string; only?: string }>();
const config = loadConfig();
const base = new URL(process.env.BENCH_PG_URL ?? config.databaseUrl);
const runs = Number(opts.runs);
const concurrency = Math.max(1, Number(opts.concurrency));
const rounds = Math.max(1, Number(opts.rounds));

const FLOOR = "/api/me";
/** The first cluster of the default scan; its id is looked up before the measurements. */
const CLUSTER_DETAIL = "/api/analytics/clusters/:first";
const allRoutes = [
  FLOOR,
  "/api/overview",
  "/api/analytics/rates/components",
  "/api/analytics/rates/hour-bands?components=ENG-CSA-HPLUG",
  "/api/analytics/rates/temperature-bands?components=ENG-CSA-HPLUG&engineFamilies=K18-3G,K26-4R",
  "/api/analytics/rates/monthly?components=ENG-CSA-HPLUG",
  "/api/analytics/clusters",
  CLUSTER_DETAIL,
  "/api/analytics/life/weibull?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109",
  "/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109",
  "/api/analytics/life/mcf?component=HYD-LIN-HOSE",
];
const routes = allRoutes.filter((r) => r === FLOOR || !opts.only || r.includes(opts.only));

async function ensureDatabase(name: string): Promise<string> {
  const admin = new pg.Client({ connectionString: Object.assign(new URL(base), { pathname: "/postgres" }).toString() });
  await admin.connect();
  const exists = await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [name]);
  if (exists.rowCount === 0) await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  return Object.assign(new URL(base), { pathname: `/${name}` }).toString();
}

/** A stored session for a group-wide analyst, and its cookie signed with `secret`. */
async function analystCookie(db: Db, secret: string): Promise<string> {
  const sid = randomBytes(16).toString("hex");
  const expires = new Date(Date.now() + 3600_000);
  const sess = { cookie: { expires: expires.toISOString(), path: "/" }, user: { sub: "bench", name: "Bench", email: null, roles: ["analyst"], shops: [] } };
  await db.insertInto("app_session").values({ sid, expire: expires, sess: JSON.stringify(sess) }).execute();
  return `ironledger.sid=${encodeURIComponent(`s:${sid}.${createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "")}`)}`;
}

const pools: Db[] = [];

/** An app over a pool of its own (empty in-process caches) listening on a loopback port. */
async function startApp(url: string) {
  const { db, pool } = createDb(url);
  const secret = randomBytes(16).toString("hex");
  const app = createApp({
    db, pool, publicUrl: "http://127.0.0.1:1", sessionSecret: secret,
    oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "bench", clientSecret: "bench" }),
    issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops",
  });
  const cookie = await analystCookie(db, secret);
  const server = app.listen(0, "127.0.0.1");
  await new Promise<void>((resolve) => server.once("listening", () => resolve()));
  const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const get = async (route: string): Promise<{ ms: number; body: unknown }> => {
    const t0 = performance.now();
    const res = await fetch(origin + route, { headers: { Cookie: cookie } });
    const body: unknown = await res.json();
    const ms = performance.now() - t0;
    if (res.status !== 200) throw new Error(`${route} answered ${res.status}: ${JSON.stringify(body)}`);
    return { ms, body };
  };
  // the pool stays open until the scale is done: the session store prunes through it once at start
  const stop = async () => {
    await new Promise<void>((resolve) => server.close(() => resolve()));
    pools.push(db);
  };
  return { get, stop };
}

interface Figures { first: number; p50: number; p95: number }

/** The first call alone, then `runs` calls with up to `concurrency` in flight. */
async function measure(url: string, route: string): Promise<Figures> {
  const app = await startApp(url);
  try {
    const first = (await app.get(route)).ms;
    const times: number[] = [];
    let next = 0;
    const worker = async () => {
      while (next < runs) {
        next++;
        times.push((await app.get(route)).ms);
      }
    };
    await Promise.all(Array.from({ length: Math.min(concurrency, runs) }, worker));
    times.sort((a, b) => a - b);
    return { first, p50: quantile(times, 0.5) ?? NaN, p95: quantile(times, 0.95) ?? NaN };
  } finally {
    await app.stop();
  }
}

async function firstClusterPath(url: string): Promise<string> {
  const app = await startApp(url);
  try {
    const list = (await app.get("/api/analytics/clusters")).body as { clusters: { id: string }[] };
    if (!list.clusters.length) throw new Error("the default cluster scan found no cluster to open");
    return `/api/analytics/clusters/${list.clusters[0].id}`;
  } finally {
    await app.stop();
  }
}

const ms = (v: number) => (Number.isFinite(v) ? `${v.toFixed(0)} ms` : "–").padStart(9);

for (const scale of opts.scales.split(",").map(Number)) {
  const url = await ensureDatabase(`ironledger_bench_x${String(scale).replace(".", "_")}`);
  {
    const { db, pool } = createDb(url);
    await migrateToLatest(db);
    if (await warehouseIsEmpty(db)) {
      process.stdout.write(`Loading the demo world at scale ${scale}…\n`);
      const s = await loadDemo(db, pool, { dir: path.join(config.dataDir, `bench-demo-x${scale}`), scale, log: () => {} });
      process.stdout.write(`  ${s.read.toLocaleString("en-US")} rows in ${s.seconds.toFixed(0)} s (exposure rebuild ${s.exposureSeconds.toFixed(0)} s)\n`);
    }
    const counts = await db
      .selectNoFrom((eb) => [
        eb.selectFrom("dim_machine").select(eb.fn.countAll<string>().as("n")).as("machines"),
        eb.selectFrom("fact_repair_line").select(eb.fn.countAll<string>().as("n")).as("lines"),
      ])
      .executeTakeFirstOrThrow();
    await db.destroy();
    process.stdout.write(
      `\nscale ${scale} (${Number(counts.machines).toLocaleString("en-US")} machines, ${Number(counts.lines).toLocaleString("en-US")} repair lines), ` +
        `${runs} repeats per route, ${concurrency} in flight, ${rounds} round(s)\n`,
    );
  }
  const detail = routes.includes(CLUSTER_DETAIL) ? await firstClusterPath(url) : CLUSTER_DETAIL;
  const results = new Map<string, Figures[]>(routes.map((r) => [r, []]));
  for (let round = 0; round < rounds; round++) {
    for (const r of routes) results.get(r)!.push(await measure(url, r === CLUSTER_DETAIL ? detail : r));
  }
  const med = (r: string, k: keyof Figures) => median(results.get(r)!.map((f) => f[k])) ?? NaN;
  const floor = med(FLOOR, "p95");
  process.stdout.write(`${"route".padEnd(100)} ${"first".padStart(9)} ${"p50".padStart(9)} ${"p95".padStart(9)} ${"p95/floor".padStart(9)}\n`);
  for (const r of routes) {
    const label = r === FLOOR ? `${r} (floor)` : r === CLUSTER_DETAIL ? `${CLUSTER_DETAIL} → ${detail}` : r;
    process.stdout.write(
      `${label.padEnd(100)} ${ms(med(r, "first"))} ${ms(med(r, "p50"))} ${ms(med(r, "p95"))} ${(Number.isFinite(med(r, "p95") / floor) ? `${(med(r, "p95") / floor).toFixed(1)}×` : "–").padStart(9)}\n`,
    );
  }
  for (const db of pools.splice(0)) await db.destroy();
}
process.exit(0);
