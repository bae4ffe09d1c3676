// npm run bench:upload [-- --rows N] [--runs R]
// Upload to dashboard: the demo world in a database of its own (loaded once), the app in this process with
// the imports' checks and loads on their worker thread, and a jobs export of N new repair-order lines (a
// month after the demo's last date, hour meters rising from each machine's last reading) sent as a browser
// would. Prints, per run: upload answered, check done (preview ready), load done (batch stored, derived
// tables refreshed), and the moment the Overview lists the file; with the process's peak RSS during the
// load. The floor is a plain GET /api/me in the same run.
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

const o = new Command("bench-upload")
  .option("--rows <n>", "repair-order lines in the uploaded file", (v) => Number(v), 5000)
  .option("--runs <n>", "uploads (each a file of its own)", (v) => Number(v), 3)
  .parse()
  .opts<{ rows: number; runs: number }>();

const base = process.env.BENCH_PG_URL ?? process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/postgres";

async function database(): Promise<string> {
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

const runs: { check: number; load: number; overview: number; floor: number; rss: number; mb: number }[] = [];
const dir = mkdtempSync(path.join(os.tmpdir(), "bench-upload-files-"));
for (let run = 1; run <= o.runs; run++) {
  const file = await exportFile(pool, o.rows, Date.now() % 1e6 + run, dir);
  const bytes = (await import("node:fs")).readFileSync(file);
  await json("/api/overview"); // warm
  const f0 = performance.now();
  await json("/api/me");
  const floor = performance.now() - f0;
  let rss = process.memoryUsage().rss;
  const sampler = setInterval(() => (rss = Math.max(rss, process.memoryUsage().rss)), 100);
  const t0 = performance.now();
  const form = new FormData();
  form.append("files", new Blob([bytes], { type: "text/csv" }), path.basename(file));
  const up = (await json("/api/imports", { method: "POST", body: form })) as { imports: { id: string }[] };
  const id = up.imports[0].id;
  await until(id, (u) => u.status === "ready");
  const check = performance.now() - t0;
  await json(`/api/imports/${id}/load`, { method: "POST" });
  await until(id, (u) => u.status === "loaded");
  const load = performance.now() - t0;
  // the Overview lists the file among its shops' latest loads
  for (;;) {
    const ov = (await json("/api/overview")) as { loads: { files: { fileName: string }[] }[] };
    if (ov.loads.some((l) => l.files.some((x) => x.fileName === path.basename(file)))) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  const overview = performance.now() - t0;
  clearInterval(sampler);
  runs.push({ check, load, overview, floor, rss: rss / 1048576, mb: bytes.length / 1048576 });
  process.stdout.write(
    `run ${run}: ${o.rows.toLocaleString("en-US")} lines (${(bytes.length / 1048576).toFixed(1)} MB): preview ready ${(check / 1000).toFixed(1)} s, ` +
      `loaded ${(load / 1000).toFixed(1)} s, on the Overview ${(overview / 1000).toFixed(1)} s after the upload; peak RSS ${(rss / 1048576).toFixed(0)} MB; /api/me ${floor.toFixed(0)} ms\n`,
  );
}
const med = (k: keyof (typeof runs)[number]) => median(runs.map((r) => r[k])) ?? NaN;
process.stdout.write(
  `median of ${runs.length}: preview ${(med("check") / 1000).toFixed(1)} s, loaded ${(med("load") / 1000).toFixed(1)} s, on the Overview ${(med("overview") / 1000).toFixed(1)} s; peak RSS ${med("rss").toFixed(0)} MB\n`,
);
await new Promise<void>((resolve) => server.close(() => resolve()));
await db.destroy();
process.exit(0);
