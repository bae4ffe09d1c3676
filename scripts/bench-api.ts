/**
 * npm run bench:api [-- --scales 1,5 --runs 20]
 * Loads the demo world at each scale into its own database on the local cluster (kept for the next run),
 * then calls every analytics route in-process through HTTP (supertest) and prints the first call and the
 * median and p95 latency of the repeats. Needs the project's PostgreSQL (npm start's, on PGPORT) running,
 * or BENCH_PG_URL pointing at a server where databases may be created.
 */
import { Command } from "commander";
import pg from "pg";
import path from "node:path";
import request from "supertest";
import { createHmac, randomBytes } from "node:crypto";
import { quantile } from "d3-array";
import { loadConfig } from "../server/config.js";
import { createDb } from "../server/db/database.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { loadDemo, warehouseIsEmpty } from "../server/demo/load-demo.js";
import { createApp } from "../server/app.js";
import { createOidcClient } from "../server/auth/oidc-client.js";

const opts = new Command().option("--scales <list>", "demo scales", "1,5").option("--runs <n>", "repeats per route", "20").parse().opts<{ scales: string; runs: string }>();
const config = loadConfig();
const base = new URL(process.env.BENCH_PG_URL ?? config.databaseUrl);

const routes = [
  "/api/analytics/rates/hour-bands?components=ENG-CSA-HPLUG",
  "/api/analytics/rates/temperature-bands?components=ENG-CSA-HPLUG&engineFamilies=K18-3G,K26-4R",
  "/api/analytics/rates/components",
  "/api/analytics/rates/monthly?components=ENG-CSA-HPLUG",
  "/api/analytics/life/weibull?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109",
  "/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG&engineFamilies=K26-4R&compareBy=lot&compareValue=BT-2109",
  "/api/analytics/life/mcf?component=HYD-LIN-HOSE",
  "/api/analytics/clusters",
];

async function ensureDatabase(name: string): Promise<string> {
  const admin = new pg.Client({ connectionString: Object.assign(new URL(base), { pathname: "/postgres" }).toString() });
  await admin.connect();
  const exists = await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [name]);
  if (exists.rowCount === 0) await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  return Object.assign(new URL(base), { pathname: `/${name}` }).toString();
}

for (const scale of opts.scales.split(",").map(Number)) {
  const url = await ensureDatabase(`ironledger_bench_x${String(scale).replace(".", "_")}`);
  const { db, pool } = createDb(url);
  await migrateToLatest(db);
  if (await warehouseIsEmpty(db)) {
    process.stdout.write(`Loading the demo world at scale ${scale}…\n`);
    const s = await loadDemo(db, pool, { dir: path.join(config.dataDir, `bench-demo-x${scale}`), scale, log: () => {} });
    process.stdout.write(`  ${s.read.toLocaleString("en-US")} rows in ${s.seconds.toFixed(0)} s (exposure rebuild ${s.exposureSeconds.toFixed(0)} s)\n`);
  }
  const secret = randomBytes(16).toString("hex");
  const app = createApp({
    db, pool, publicUrl: "http://127.0.0.1:1", sessionSecret: secret,
    oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "bench", clientSecret: "bench" }),
    issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops",
  });
  const sid = randomBytes(16).toString("hex");
  const expires = new Date(Date.now() + 3600_000);
  await db.insertInto("app_session").values({ sid, expire: expires, sess: JSON.stringify({ cookie: { expires: expires.toISOString(), path: "/" }, user: { sub: "bench", name: "Bench", email: null, roles: ["analyst"], shops: [] } }) }).execute();
  const cookie = `ironledger.sid=${encodeURIComponent(`s:${sid}.${createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "")}`)}`;
  const machines = await db.selectFrom("dim_machine").select((eb) => eb.fn.countAll<string>().as("n")).executeTakeFirstOrThrow();
  process.stdout.write(`\nscale ${scale} (${Number(machines.n).toLocaleString("en-US")} machines), ${opts.runs} repeats per route\n`);
  process.stdout.write(`${"route".padEnd(100)} ${"first".padStart(8)} ${"median".padStart(8)} ${"p95".padStart(8)}\n`);
  for (const r of routes) {
    const times: number[] = [];
    let first = 0;
    for (let i = 0; i <= Number(opts.runs); i++) {
      const t0 = performance.now();
      const res = await request(app).get(r).set("Cookie", cookie);
      const ms = performance.now() - t0;
      if (res.status !== 200) throw new Error(`${r} answered ${res.status}: ${JSON.stringify(res.body)}`);
      if (i === 0) first = ms;
      else times.push(ms);
    }
    times.sort((a, b) => a - b);
    const f = (v: number | undefined) => `${(v ?? 0).toFixed(0)} ms`.padStart(8);
    process.stdout.write(`${r.padEnd(100)} ${f(first)} ${f(quantile(times, 0.5))} ${f(quantile(times, 0.95))}\n`);
  }
  await db.destroy();
}
