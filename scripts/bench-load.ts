/**
 * npm run bench:load [-- --seconds 30 --connections 50 --floor-connections 5 --runs 3 --scale 1]
 *                       [--cold] [--one-session] [--only <regexp>] [--server-flags "<node flags>"] [--profile <dir>]
 *
 * The server under mixed load: the demo world (scale 1 by default, database ironledger_bench_x<scale> on
 * BENCH_PG_URL or the project's PostgreSQL, shared with bench:api and kept), the app in a process of its own
 * (scripts/bench/serve.ts, with the product's answer warm-up), then for `seconds` every heavy route at once —
 * overview, rates, life curves, clusters, benchmarks, the repairs list and the whole repairs CSV — over
 * `connections - floor-connections` connections shared between them, while `/api/me` (a session look-up and
 * nothing else: the floor) runs on `floor-connections` of its own. Each connection is a signed-in analyst of
 * its own (`--one-session`: all of them send one session, as one person's many tabs). Prints per route the
 * requests, errors (non-2xx answers, connection errors and time-outs), p50, p99 and max; the server's RSS
 * (sampled every 250 ms, and the kernel's high-water mark), its CPU use and its event-loop delay (measured
 * inside the server). `--runs N` starts a new server for each run and prints the medians. Without `--cold`,
 * each route (and every answer the server's own warm-up computes) is called once before the load and the
 * load waits until the server is idle (those first calls are printed); with `--cold` the load starts as soon
 * as the server listens. `--profile` writes the server's CPU profile per run (node --cpu-prof).
 */
import { spawn, execFileSync, type ChildProcess } from "node:child_process";
import { readFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { createInterface } from "node:readline";
import { monitorEventLoopDelay } from "node:perf_hooks";
import type Autocannon from "autocannon";

if (process.argv.includes("--serve")) {
  // the server process: serve.ts, plus its event loop's delay every second ("eld <max ms> <p99 ms>")
  const h = monitorEventLoopDelay({ resolution: 10 });
  h.enable();
  setInterval(() => {
    const m = process.memoryUsage();
    const mb = (b: number) => (b / 2 ** 20).toFixed(0);
    process.stdout.write(`eld ${(h.max / 1e6).toFixed(1)} ${(h.percentile(99) / 1e6).toFixed(1)}\n`);
    process.stdout.write(`mem ${mb(m.rss)} ${mb(m.heapTotal)} ${mb(m.heapUsed)} ${mb(m.external)} ${mb(m.arrayBuffers)}\n`);
    h.reset();
  }, 1000).unref();
  await import("./bench/serve.js");
} else {
  await main();
}

interface RouteRun {
  route: string;
  connections: number;
  requests: number;
  non2xx: Record<string, number>;
  failures: number; // connection errors and time-outs
  p50: number;
  p99: number;
  max: number;
  first: number | null;
}

/** process.memoryUsage() of the server, in MB, once a second */
interface Mem {
  at: number;
  rss: number;
  heapTotal: number;
  heapUsed: number;
  external: number;
  arrayBuffers: number;
}

interface Run {
  routes: RouteRun[];
  rssPeakSampled: number;
  rssHighWater: number;
  rssEnd: number;
  eldMax: number;
  eldP99: number;
  load: number[];
  /** the server's CPU use during the load, in cores */
  serverCores: number;
  /** the server's own memory figures at its highest RSS during the load */
  atPeak: Mem | null;
}

async function main() {
  const { Command } = await import("commander");
  const pg = (await import("pg")).default;
  const autocannon = (await import("autocannon")).default;
  const { median, quantile } = await import("d3-array");
  const { loadConfig } = await import("../server/config.js");
  const { createDb } = await import("../server/db/database.js");
  const { migrateToLatest } = await import("../server/db/migrate.js");
  const { loadDemo, warehouseIsEmpty } = await import("../server/demo/load-demo.js");
  const { serviceSessionCookie } = await import("../server/auth/service-session.js");
  const { randomBytes } = await import("node:crypto");
  const { WARM_REQUESTS } = await import("../server/services/answer-warmer.js");

  const o = new Command()
    .option("--seconds <n>", "seconds of load per run", (v) => Number(v), 30)
    .option("--connections <n>", "connections in all (heavy routes + floor)", (v) => Number(v), 50)
    .option("--floor-connections <n>", "of those, connections on /api/me", (v) => Number(v), 5)
    .option("--runs <n>", "runs, each on a freshly started server; medians printed", (v) => Number(v), 3)
    .option("--scale <n>", "demo world scale", (v) => Number(v), 1)
    .option("--cold", "start the load as soon as the server listens (no first call per route before it)")
    .option("--only <regexp>", "heavy routes whose path matches (the floor always runs)")
    .option("--one-session", "every connection sends the same session (one person's many tabs) instead of one session each")
    .option("--server-flags <flags>", "node flags for the server process only (default: those of scripts/start.sh)", "--max-semi-space-size=8")
    .option("--profile <dir>", "write the server's CPU profile (node --cpu-prof) of each run to this folder")
    .parse()
    .opts<{ seconds: number; connections: number; floorConnections: number; runs: number; scale: number; cold?: boolean; only?: string; profile?: string; oneSession?: boolean; serverFlags?: string }>();

  const FLOOR = "/api/me";
  const HEAVY = [
    "/api/overview",
    "/api/analytics/rates/components",
    "/api/analytics/rates/monthly?components=ENG-CSA-HPLUG",
    "/api/analytics/life/weibull?component=ENG-CSA-HPLUG",
    "/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG",
    "/api/analytics/clusters",
    "/api/benchmarks/shops",
    "/api/repairs",
    "/api/repairs.csv",
  ].filter((r) => !o.only || new RegExp(o.only).test(r));
  const heavyConnections = o.connections - o.floorConnections;
  if (heavyConnections < HEAVY.length) throw new Error(`--connections must leave at least one connection per heavy route (${HEAVY.length})`);

  const config = loadConfig();
  const base = new URL(process.env.BENCH_PG_URL ?? config.databaseUrl);
  const dbName = `ironledger_bench_x${String(o.scale).replace(".", "_")}`;
  const urlFor = (name: string) => Object.assign(new URL(base), { pathname: `/${name}` }).toString();
  const log = (line: string) => process.stdout.write(line + "\n");
  const fmt = (v: number) => (Number.isFinite(v) ? Math.round(v).toLocaleString("en-US") : "–");

  const admin = new pg.Client({ connectionString: urlFor("postgres") });
  await admin.connect();
  if ((await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [dbName])).rowCount === 0) await admin.query(`CREATE DATABASE ${dbName}`);
  await admin.end();
  const url = urlFor(dbName);
  const { db, pool } = createDb(url, 4);
  await migrateToLatest(db);
  if (await warehouseIsEmpty(db)) {
    log(`Loading the demo world at scale ${o.scale} into ${dbName}…`);
    const s = await loadDemo(db, pool, { dir: path.join(config.dataDir, `bench-demo-x${o.scale}`), scale: o.scale, log: () => {} });
    log(`  ${s.read.toLocaleString("en-US")} rows in ${s.seconds.toFixed(0)} s`);
  }
  const lines = Number((await pool.query<{ n: string }>("SELECT count(*)::text AS n FROM fact_repair_line")).rows[0].n);

  const git = (...args: string[]) => {
    try {
      return execFileSync("git", args, { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] }).trim();
    } catch {
      return "?";
    }
  };
  const dirty = git("status", "--porcelain") !== "" ? " (working tree with uncommitted changes)" : "";
  log(`bench:load · ${new Date().toISOString()} · commit ${git("rev-parse", "--short", "HEAD")}${dirty}`);
  log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "?"}, ${(os.totalmem() / 2 ** 30).toFixed(0)} GB, Node ${process.version}, load average ${os.loadavg().map((l) => l.toFixed(2)).join(" ")}`);
  log(`warehouse: ${dbName}, ${lines.toLocaleString("en-US")} repair lines`);
  log(`load: ${o.seconds} s × ${o.connections} connections (${heavyConnections} over ${HEAVY.length} heavy routes, ${o.floorConnections} on ${FLOOR}), ${o.runs} run(s), ${o.cold ? "cold (no first calls before the load)" : "after one first call per route"}, ${o.oneSession ? "one session for every connection" : "a session per connection"}${o.serverFlags ? `, server flags ${o.serverFlags}` : ""}`);

  const status = (pid: number, field: "VmRSS" | "VmHWM") => {
    const m = new RegExp(`${field}:\\s+(\\d+) kB`).exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) / 1024 : NaN;
  };

  /** CPU seconds (user + system) a process has used, from /proc (clock ticks of 1/100 s). */
  const cpuSeconds = (pid: number) => {
    const fields = readFileSync(`/proc/${pid}/stat`, "utf8").replace(/^.*\) /, "").split(" ");
    return (Number(fields[11]) + Number(fields[12])) / 100;
  };

  /** Waits until the server uses under a tenth of a core for two seconds running (its own warm-up done), at most `limitS`. */
  async function quiet(pid: number, limitS = 180): Promise<number> {
    const t0 = Date.now();
    let calm = 0;
    while (calm < 2 && Date.now() - t0 < limitS * 1000) {
      const c0 = cpuSeconds(pid);
      await new Promise((r) => setTimeout(r, 1000));
      calm = cpuSeconds(pid) - c0 < 0.1 ? calm + 1 : 0;
    }
    return (Date.now() - t0) / 1000;
  }

  async function startServer(secret: string): Promise<{ origin: string; child: ChildProcess; eld: { at: number; max: number; p99: number }[]; mem: Mem[] }> {
    const profile = o.profile ? ["--cpu-prof", "--cpu-prof-dir", path.resolve(o.profile)] : [];
    const flags = o.serverFlags ? o.serverFlags.split(/\s+/).filter(Boolean) : [];
    const child = spawn(process.execPath, [...flags, ...profile, "--import", "tsx", import.meta.filename, "--serve"], {
      env: { ...process.env, BENCH_DB_URL: url, BENCH_SESSION_SECRET: secret, LOG_LEVEL: "silent", NODE_ENV: "production" },
      stdio: ["ignore", "pipe", "inherit"],
    });
    const eld: { at: number; max: number; p99: number }[] = [];
    const mem: Mem[] = [];
    const reader = createInterface({ input: child.stdout! });
    return await new Promise((resolve, reject) => {
      reader.on("line", (line) => {
        const l = /^listening (\d+)$/.exec(line);
        if (l) resolve({ origin: `http://127.0.0.1:${l[1]}`, child, eld, mem });
        const e = /^eld ([\d.]+) ([\d.]+)$/.exec(line);
        if (e) eld.push({ at: Date.now(), max: Number(e[1]), p99: Number(e[2]) });
        const m = /^mem (\d+) (\d+) (\d+) (\d+) (\d+)$/.exec(line);
        if (m) mem.push({ at: Date.now(), rss: Number(m[1]), heapTotal: Number(m[2]), heapUsed: Number(m[3]), external: Number(m[4]), arrayBuffers: Number(m[5]) });
      });
      child.once("exit", (code) => reject(new Error(`the benchmark server exited (${code}) before it listened`)));
    });
  }

  const stopServer = (child: ChildProcess) =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null) return resolve();
      child.once("exit", () => resolve());
      child.kill("SIGTERM");
    });

  /**
   * `cookies.length` connections on one route for `seconds`: with one cookie, one autocannon instance whose
   * connections all send it (one person's tabs); with several, one single-connection instance per cookie.
   */
  async function load(origin: string, route: string, cookies: string[], connections: number, seconds: number): Promise<Omit<RouteRun, "first">> {
    const times: number[] = [];
    const non2xx: Record<string, number> = {};
    const groups = cookies.length === 1 ? [{ cookie: cookies[0], connections }] : cookies.map((cookie) => ({ cookie, connections: 1 }));
    const results = await Promise.all(
      groups.map(
        (g) =>
          new Promise<Autocannon.Result>((resolve, reject) => {
            const instance = autocannon(
              { url: origin + route, connections: g.connections, duration: seconds, headers: { cookie: g.cookie, "accept-encoding": "br, gzip" }, timeout: 60 },
              (err, r) => (err ? reject(err) : resolve(r)),
            );
            instance.on("response", (_client, statusCode, _bytes, ms) => {
              if (statusCode < 200 || statusCode > 299) non2xx[statusCode] = (non2xx[statusCode] ?? 0) + 1;
              times.push(ms);
            });
          }),
      ),
    );
    times.sort((a, b) => a - b);
    return {
      route,
      connections,
      requests: times.length,
      non2xx,
      failures: results.reduce((a, r) => a + r.errors + r.timeouts, 0),
      p50: quantile(times, 0.5) ?? NaN,
      p99: quantile(times, 0.99) ?? NaN,
      max: times.at(-1) ?? NaN,
    };
  }

  const runs: Run[] = [];
  for (let run = 1; run <= o.runs; run++) {
    const secret = randomBytes(16).toString("hex");
    const signIn = (n: number) => serviceSessionCookie(pool, secret, { sub: `bench-load-${run}-${n}`, name: "Load bench", email: null, roles: ["analyst"], shops: [] }, 6);
    const cookie = await signIn(0);
    // one session per connection (as many people), or one for all of them (--one-session)
    const sessions = o.oneSession ? [cookie] : await Promise.all(Array.from({ length: o.connections }, (_, n) => signIn(n + 1)));
    let nextSession = 0;
    const take = (n: number) => (o.oneSession ? sessions : sessions.slice(nextSession, (nextSession += n)));
    const { origin, child, eld, mem } = await startServer(secret);
    try {
      const first = new Map<string, number>();
      if (!o.cold) {
        // every answer the server's own warm-up computes too, so none is left for it to compute during the load
        for (const r of new Set([FLOOR, ...HEAVY, ...WARM_REQUESTS])) {
          const t0 = performance.now();
          const res = await fetch(origin + r, { headers: { Cookie: cookie, "Accept-Encoding": "br, gzip" } });
          await res.arrayBuffer();
          if (!res.ok) throw new Error(`${r} answered ${res.status} before the load`);
          first.set(r, performance.now() - t0);
        }
        const waited = await quiet(child.pid!);
        // a worker thread (cluster scan, life-curve fits) gives its heap back 5 s after its last task
        await new Promise((r) => setTimeout(r, 6000));
        log(`run ${run}: first calls done; the server was idle ${waited.toFixed(0)} s later; RSS before the load ${fmt(status(child.pid!, "VmRSS"))} MB`);
      }
      let rssPeak = 0;
      const sampler = setInterval(() => (rssPeak = Math.max(rssPeak, status(child.pid!, "VmRSS"))), 250);
      const started = Date.now();
      const loadBefore = os.loadavg()[0];
      const cpuBefore = cpuSeconds(child.pid!);
      const share = (i: number) => Math.floor(heavyConnections / HEAVY.length) + (i < heavyConnections % HEAVY.length ? 1 : 0);
      const results = await Promise.all([
        load(origin, FLOOR, take(o.floorConnections), o.floorConnections, o.seconds),
        ...HEAVY.map((r, i) => load(origin, r, take(share(i)), share(i), o.seconds)),
      ]);
      clearInterval(sampler);
      const serverCores = (cpuSeconds(child.pid!) - cpuBefore) / ((Date.now() - started) / 1000);
      rssPeak = Math.max(rssPeak, status(child.pid!, "VmRSS"));
      const during = eld.filter((e) => e.at >= started + 1000 && e.at <= Date.now());
      const memDuring = mem.filter((e) => e.at >= started && e.at <= Date.now());
      const atPeak = memDuring.reduce<Mem | null>((a, m) => (!a || m.rss > a.rss ? m : a), null);
      const r: Run = {
        routes: results.map((x) => ({ ...x, first: first.get(x.route) ?? null })),
        rssPeakSampled: rssPeak,
        rssHighWater: status(child.pid!, "VmHWM"),
        rssEnd: status(child.pid!, "VmRSS"),
        eldMax: Math.max(0, ...during.map((e) => e.max)),
        eldP99: quantile(during.map((e) => e.p99).sort((a, b) => a - b), 0.5) ?? NaN,
        load: [loadBefore, os.loadavg()[0]],
        serverCores,
        atPeak,
      };
      runs.push(r);
      log(`\nrun ${run}: RSS peak ${fmt(r.rssPeakSampled)} MB sampled (high-water ${fmt(r.rssHighWater)} MB, ${fmt(r.rssEnd)} MB at the end); event-loop delay max ${fmt(r.eldMax)} ms, median of the per-second p99s ${fmt(r.eldP99)} ms; server CPU ${r.serverCores.toFixed(2)} cores; load average ${r.load.map((l) => l.toFixed(1)).join(" → ")}`);
      if (r.atPeak) log(`  at the RSS peak: V8 heap ${r.atPeak.heapUsed} MB used of ${r.atPeak.heapTotal} MB, external ${r.atPeak.external} MB (array buffers ${r.atPeak.arrayBuffers} MB), the rest (code, stacks, threads, allocator) ${r.atPeak.rss - r.atPeak.heapTotal - r.atPeak.external} MB`);
      for (const x of r.routes) {
        const bad = Object.entries(x.non2xx).map(([s, n]) => `${n}×${s}`).join(" ");
        log(`  ${x.route.padEnd(58)} ${String(x.connections).padStart(2)} conn ${String(x.requests).padStart(7)} req  p50 ${fmt(x.p50).padStart(6)} ms  p99 ${fmt(x.p99).padStart(6)} ms  max ${fmt(x.max).padStart(6)} ms${x.first !== null ? `  first ${fmt(x.first)} ms` : ""}${bad || x.failures ? `  errors: ${bad} ${x.failures ? `${x.failures} failed` : ""}` : ""}`);
      }
    } finally {
      await stopServer(child);
    }
  }

  const med = (f: (r: Run) => number) => median(runs.map(f)) ?? NaN;
  const routeMed = (route: string, f: (x: RouteRun) => number) => median(runs.map((r) => f(r.routes.find((x) => x.route === route)!))) ?? NaN;
  const errorsOf = (x: RouteRun) => Object.values(x.non2xx).reduce((a, b) => a + b, 0) + x.failures;
  log(`\nMedians of ${runs.length} run(s) (errors: the sum over all runs)\n`);
  log(`| route | connections | requests | errors / non-2xx | p50 (ms) | p99 (ms) | max (ms) |${o.cold ? "" : " first call (ms) |"}`);
  log(`|---|---:|---:|---:|---:|---:|---:|${o.cold ? "" : "---:|"}`);
  for (const route of [FLOOR, ...HEAVY]) {
    const errors = runs.reduce((a, r) => a + errorsOf(r.routes.find((x) => x.route === route)!), 0);
    log(
      `| \`${route}\`${route === FLOOR ? " (floor)" : ""} | ${runs[0].routes.find((x) => x.route === route)!.connections} | ${fmt(routeMed(route, (x) => x.requests))} | ${errors} | ${fmt(routeMed(route, (x) => x.p50))} | ${fmt(routeMed(route, (x) => x.p99))} | ${fmt(routeMed(route, (x) => x.max))} |${o.cold ? "" : ` ${fmt(routeMed(route, (x) => x.first ?? NaN))} |`}`,
    );
  }
  log("");
  log(`- server RSS, peak sampled every 250 ms: ${runs.map((r) => fmt(r.rssPeakSampled)).join(" · ")} MB (median ${fmt(med((r) => r.rssPeakSampled))}); kernel high-water mark ${runs.map((r) => fmt(r.rssHighWater)).join(" · ")} MB`);
  log(`- server CPU during the load: ${runs.map((r) => r.serverCores.toFixed(2)).join(" · ")} cores; machine load average (1 min) at start and end: ${runs.map((r) => r.load.map((l) => l.toFixed(1)).join("→")).join(" · ")}`);
  log(`- server event-loop delay during the load: max ${runs.map((r) => fmt(r.eldMax)).join(" · ")} ms; median per-second p99 ${runs.map((r) => fmt(r.eldP99)).join(" · ")} ms`);
  const floorP99 = routeMed(FLOOR, (x) => x.p99);
  const allErrors = runs.reduce((a, r) => a + r.routes.reduce((b, x) => b + errorsOf(x), 0), 0);
  log(`- goal: zero errors (${allErrors}), floor p99 ≤ 1,000 ms while the heavy routes run (${fmt(floorP99)} ms), RSS ≤ 300 MB (${fmt(med((r) => r.rssPeakSampled))} MB): ${allErrors === 0 && floorP99 <= 1000 && med((r) => r.rssPeakSampled) <= 300 ? "met" : "missed"}`);
  await db.destroy();
  process.exit(0);
}
