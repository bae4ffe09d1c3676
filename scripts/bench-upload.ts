// npm run bench:upload [-- --rows N] [--runs R] [--database NAME] [--no-warm]
// Upload to dashboard. The warehouse: by default the demo world in a database of its own, loaded once; with
// --database, an existing one on BENCH_PG_URL's server (e.g. ironledger_scale_1000000 from bench:scale), used
// as it is once migrated. The app runs in this process with the imports' checks and loads on their worker
// thread and the answer warm-up as the product runs it (--no-warm: without). Each run sends a jobs export of
// N new repair-order lines (a day or more after each machine's last reading, hour meters rising) as a browser
// would, and prints seconds after the upload: preview ready (check done); the progress bar at 100 % (rows in,
// the derived tables' refresh follows); loaded (refresh done); the Overview lists the file (an answer
// computed for data holding it) and its clusters are for that data too; the Imports page says the dashboards
// are current (the batch's `dashboards`; "n/a" on a server without it). Also the slowest Overview answer
// meanwhile, the process's peak RSS (app, warm-up, worker threads) and the floor, a plain GET /api/me.
import { Command } from "commander";
import pg from "pg";
import os from "node:os";
import path from "node:path";
import { mkdtempSync, writeFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { randomBytes } from "node:crypto";
import { median } from "d3-array";
import { createDb } from "../server/db/database.js";
import { serviceSessionCookie } from "../server/auth/service-session.js";
import { migrateToLatest } from "../server/db/migrate.js";
import { loadDemo, warehouseIsEmpty } from "../server/demo/load-demo.js";
import { createApp } from "../server/app.js";
import { createOidcClient } from "../server/auth/oidc-client.js";
import * as answerWarmer from "../server/services/answer-warmer.js";

const o = new Command("bench-upload")
  .option("--rows <n>", "repair-order lines in the uploaded file", (v) => Number(v), 5000)
  .option("--runs <n>", "uploads (each a file of its own)", (v) => Number(v), 3)
  .option("--database <name>", "an existing warehouse on BENCH_PG_URL's server, used as it is (no demo load)")
  .option("--no-warm", "without the answer warm-up (the product runs it)")
  .parse()
  .opts<{ rows: number; runs: number; database?: string; warm: boolean }>();

const base = process.env.BENCH_PG_URL ?? process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/postgres";

async function database(): Promise<string> {
  if (o.database) {
    if (!/^\w+$/.test(o.database)) throw new Error(`--database: a plain name, not ${o.database}`);
    return Object.assign(new URL(base), { pathname: `/${o.database}` }).toString();
  }
  const admin = new pg.Client({ connectionString: base });
  await admin.connect();
  const name = "ironledger_bench_upload";
  if ((await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [name])).rowCount === 0) await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  return Object.assign(new URL(base), { pathname: `/${name}` }).toString();
}

const HEADER =
  "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,meter_note,complaint,cause,correction,component_code,failure_mode,labor_op,standard_hours,labor_hours,parts_cost,labor_cost,pay_type,line_type,tech_id,part_number,part_description,part_qty,supplier_lot,part_ordered_date,part_received_date,back_ordered,fault_codes,ambient_temp";

/** N new lines on machines with one meter generation, a day or more after their last reading, meters rising. */
async function exportFile(pool: pg.Pool, rows: number, run: number, dir: string): Promise<string> {
  const m = await pool.query<{ serial: string; shop: string; d: string; h: number }>(
    `SELECT m.serial, s.shop_code AS shop, max(r.reading_date)::text AS d, max(r.hours)::float8 AS h
     FROM fact_hour_reading r JOIN dim_machine m USING (machine_key) JOIN dim_shop s ON s.shop_key = m.home_shop_key
     WHERE r.valid GROUP BY m.serial, s.shop_code HAVING max(r.meter_generation) = 0 ORDER BY m.serial`,
  );
  const machines = m.rows;
  const lines: string[] = [HEADER];
  const perMachine = Math.ceil(rows / machines.length);
  let n = 0;
  for (const mc of machines) {
    for (let k = 0; k < perMachine && n < rows; k++, n++) {
      const day = new Date(`${mc.d}T00:00:00Z`);
      day.setUTCDate(day.getUTCDate() + 1 + k);
      const d = day.toISOString().slice(0, 10);
      lines.push(`${mc.shop},UPB${run}-${n},1,${mc.serial},${d},${d},${(mc.h + 8 * (k + 1)).toFixed(1)},,Hard start,Plug open,Replaced plug,ENG-CSA-HPLUG,OPEN,,1.0,1.2,40.00,90.00,customer,failure,,,,,,,,N,,`);
    }
  }
  const file = path.join(dir, `upload-${run}.csv`);
  writeFileSync(file, lines.join("\n") + "\n");
  return file;
}

const url = await database();
const { db, pool } = createDb(url, 10);
await migrateToLatest(db);
if (await warehouseIsEmpty(db)) {
  if (o.database) throw new Error(`${o.database} holds no warehouse`);
  process.stderr.write("loading the demo world once…\n");
  await loadDemo(db, pool, { dir: path.join(os.tmpdir(), "ironledger-bench-upload-demo") });
}
const secret = randomBytes(16).toString("hex");
const spoolDir = mkdtempSync(path.join(os.tmpdir(), "bench-upload-"));
const app = createApp({
  db, pool, publicUrl: "http://127.0.0.1:1", sessionSecret: secret,
  oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "bench", clientSecret: "bench" }),
  issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops",
  imports: { spoolDir, maxUploadBytes: 2 * 1024 ** 3, databaseUrl: url },
});
const cookie = await serviceSessionCookie(pool, secret, { sub: "bench", name: "Bench", email: null, roles: ["analyst"], shops: [] }, 1);
const server = app.listen(0, "127.0.0.1");
await new Promise<void>((resolve) => server.once("listening", () => resolve()));
const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
const headers = { Cookie: cookie, Origin: "http://127.0.0.1:1" };
const json = async (route: string, init: RequestInit = {}) => {
  const res = await fetch(origin + route, { ...init, headers: { ...headers, ...(init.headers ?? {}) } });
  const body = (await res.json()) as Record<string, unknown>;
  if (res.status >= 400) throw new Error(`${route}: ${res.status} ${JSON.stringify(body)}`);
  return body;
};
const until = async (id: string, done: (u: Record<string, unknown>) => boolean) => {
  for (;;) {
    const u = await json(`/api/imports/${id}`);
    if (done(u)) return u;
    if (["refused", "failed", "cancelled"].includes(u.status as string)) throw new Error(`upload ${id}: ${u.status} ${u.message}`);
    await new Promise((r) => setTimeout(r, 100));
  }
};

const { startAnswerWarmer } = answerWarmer;
// the warm-up's own account of its last pass, where the server keeps one
const lastPass = () =>
  ((answerWarmer as { warmStateOf?: (d: typeof db) => { lastPass?: { path: string; ms: number }[] } | undefined }).warmStateOf?.(db)?.lastPass ?? [])
    .map((p) => `${p.path.replace(/^\/api\//, "").replace(/\?.*/, "")} ${(p.ms / 1000).toFixed(1)}`)
    .join(", ");
let warmer: ReturnType<typeof startAnswerWarmer> | null = null;
if (o.warm) {
  const user = { sub: "bench-warm-up", name: "Answer warm-up", email: null, roles: ["analyst" as const], shops: [] };
  warmer = startAnswerWarmer({ db, origin, cookie: () => serviceSessionCookie(pool, secret, user) });
  const w0 = performance.now();
  await warmer.idle();
  process.stderr.write(`answers warmed at start in ${((performance.now() - w0) / 1000).toFixed(1)} s${lastPass() ? ` (${lastPass()})` : ""}\n`);
}
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const fmt = (ms: number | null) => (ms === null ? "n/a" : `${(ms / 1000).toFixed(1)} s`);

interface Run { check: number; full: number | null; load: number; listed: number; clusters: number; current: number | null; slowest: number; floor: number; rss: number; mb: number }
const runs: Run[] = [];
const dir = mkdtempSync(path.join(os.tmpdir(), "bench-upload-files-"));
type OverviewBody = { loads: { files: { fileName: string }[] }[]; asOf?: { batchId: string | null; current: boolean }; clusters: { asOf?: { batchId: string | null; current: boolean } } };
type BatchBody = { batch: { dashboards?: { state: string } | null } };
for (let run = 1; run <= o.runs; run++) {
  const file = await exportFile(pool, o.rows, Date.now() % 1e6 + run, dir);
  const name = path.basename(file);
  const bytes = (await import("node:fs")).readFileSync(file);
  await json("/api/overview"); // warm
  const f0 = performance.now();
  await json("/api/me");
  const floor = performance.now() - f0;
  let rss = process.memoryUsage().rss;
  const sampler = setInterval(() => (rss = Math.max(rss, process.memoryUsage().rss)), 100);
  const t0 = performance.now();
  const form = new FormData();
  form.append("files", new Blob([bytes], { type: "text/csv" }), name);
  const up = (await json("/api/imports", { method: "POST", body: form })) as { imports: { id: string }[] };
  const id = up.imports[0].id;
  await until(id, (u) => u.status === "ready");
  const check = performance.now() - t0;
  await json(`/api/imports/${id}/load`, { method: "POST" });
  // the moment the progress bar shows 100 % (the rows are in; the derived tables' refresh follows)
  let full: number | null = null;
  const done = await until(id, (u) => {
    const p = u.progress as { percent: number; phase: string } | null;
    if (full === null && p && (p.percent >= 100 || p.phase === "refreshing")) full = performance.now() - t0;
    return u.status === "loaded";
  });
  const load = performance.now() - t0;
  const batchId = BigInt(done.batchId as string);
  // the Overview (as a browser polls it) and the batch's "dashboards" (as the Imports page polls it)
  let listed: number | null = null;
  let clusters: number | null = null;
  let current: number | null = null;
  let slowest = 0;
  let hasField = true;
  const holds = (a: { batchId: string | null } | undefined) => a !== undefined && a.batchId !== null && BigInt(a.batchId) >= batchId;
  for (;;) {
    const q0 = performance.now();
    const ov = (await json("/api/overview")) as OverviewBody;
    slowest = Math.max(slowest, performance.now() - q0);
    const now = performance.now() - t0;
    const lists = ov.loads.some((l) => l.files.some((x) => x.fileName === name));
    if (lists && listed === null) listed = now;
    // an answer that says it holds the batch must list it (a server without the markers computes both at once)
    if (holds(ov.asOf) && !lists) throw new Error(`run ${run}: the Overview says it holds batch ${batchId} but does not list ${name}`);
    if (lists && clusters === null && (ov.clusters.asOf === undefined || holds(ov.clusters.asOf))) clusters = now;
    if (hasField && current === null) {
      const b = (await json(`/api/batches/${batchId}/rejects?limit=1`)) as BatchBody;
      if (b.batch.dashboards === undefined || (b.batch.dashboards === null && !o.warm)) hasField = false;
      else if (b.batch.dashboards?.state === "current") current = performance.now() - t0;
    }
    if (listed !== null && clusters !== null && (current !== null || !hasField)) break;
    await sleep(100);
  }
  // the run ends when the warm-up has finished with this load, so the next run starts from a settled server
  if (warmer) {
    await sleep(hasField ? 0 : 4000);
    await warmer.idle();
  }
  clearInterval(sampler);
  runs.push({ check, full, load, listed: listed!, clusters: clusters!, current, slowest, floor, rss: rss / 1048576, mb: bytes.length / 1048576 });
  process.stdout.write(
    `run ${run}: ${o.rows.toLocaleString("en-US")} lines (${(bytes.length / 1048576).toFixed(1)} MB): preview ready ${fmt(check)}, 100 % ${fmt(full)}, loaded ${fmt(load)}, ` +
      `on the Overview ${fmt(listed)} (its clusters ${fmt(clusters)}), dashboards current ${fmt(current)} after the upload; ` +
      `slowest Overview answer meanwhile ${slowest.toFixed(0)} ms; peak RSS ${(rss / 1048576).toFixed(0)} MB; /api/me ${floor.toFixed(0)} ms\n`,
  );
  if (warmer && lastPass()) process.stderr.write(`  warm-up pass after it (s): ${lastPass()}\n`);
}
const med = (k: keyof Run) => {
  const v = runs.map((r) => r[k]).filter((x): x is number => x !== null);
  return v.length ? (median(v) ?? null) : null;
};
process.stdout.write(
  `median of ${runs.length}${o.database ? ` on ${o.database}` : ""}${o.warm ? "" : " (no warm-up)"}: preview ${fmt(med("check"))}, 100 % ${fmt(med("full"))}, loaded ${fmt(med("load"))}, ` +
    `on the Overview ${fmt(med("listed"))} (clusters ${fmt(med("clusters"))}), dashboards current ${fmt(med("current"))}; ` +
    `slowest Overview answer ${med("slowest")?.toFixed(0)} ms; peak RSS ${med("rss")?.toFixed(0)} MB; floor /api/me ${med("floor")?.toFixed(0)} ms\n`,
);
warmer?.stop();
await new Promise<void>((resolve) => server.close(() => resolve()));
await db.destroy();
process.exit(0);
