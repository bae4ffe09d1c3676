import path from "node:path";
import { sql } from "kysely";
import type { Db } from "../db/database.js";
import { dataState, type DataState } from "../db/queries/data-version.js";
import { logger } from "../logger.js";
import { FRESH_HEADER } from "./revalidating-cache.js";
import { keepWarm } from "./worker-pool.js";
import { SCAN_TASK_FILE } from "./cluster-scan/scan-pool.js";

/** The imports' check-and-load task module (the same path import-jobs.ts runs on its worker). */
const ETL_TASK_FILE = path.join(import.meta.dirname, "imports", "etl-task.ts");

/** Uploads touched within this long count as under way (a preview left unread for longer may wait cold). */
const ACTIVE_UPLOAD_MINUTES = 30;

/**
 * Uploads under way: being checked, ready (someone is reading the preview, the load may follow), queued or
 * loading. One small query per tick over the recent uploads.
 */
async function uploadsUnderWay(db: Db): Promise<{ any: boolean; loading: boolean }> {
  const r = await sql<{ any: boolean; loading: boolean }>`
    SELECT coalesce(bool_or(status IN ('checking', 'ready', 'queued', 'loading')), false) AS any,
           coalesce(bool_or(status IN ('queued', 'loading')), false) AS loading
    FROM etl_upload WHERE updated_at > now() - make_interval(mins => ${ACTIVE_UPLOAD_MINUTES})
  `.execute(db);
  return r.rows[0] ?? { any: false, loading: false };
}

/**
 * The group-wide answers the analyst's and the director's pages open with (the same paths and query strings
 * the pages ask for, so the answers land under the keys the pages will look up). The Overview first: it is
 * the page a load shows on, and its cluster scan is the one the cluster list then finds kept.
 */
export const WARM_REQUESTS = [
  "/api/overview",
  "/api/analytics/clusters",
  "/api/analytics/rates/components",
  "/api/analytics/rates/hour-bands?components=ENG-CSA-HPLUG",
  "/api/analytics/rates/temperature-bands?components=ENG-CSA-HPLUG",
  "/api/analytics/rates/monthly?components=ENG-CSA-HPLUG",
  "/api/analytics/life/weibull?component=ENG-CSA-HPLUG",
  "/api/analytics/life/kaplan-meier?component=ENG-CSA-HPLUG",
  "/api/analytics/life/mcf?component=ENG-CSA-HPLUG",
  "/api/benchmarks/shops",
  "/api/benchmarks/funnel",
  "/api/benchmarks/trend",
] as const;

/** What the warm-up has done, for the imports pages' "dashboards current" (see dashboards-current.ts). */
export interface WarmState {
  /** the data every warm answer was last computed for (null until the first pass has finished) */
  warmedFor: DataState | null;
  /** when that pass finished */
  finishedAt: Date | null;
  /** the data a pass under way is computing for */
  warming: DataState | null;
  /** milliseconds each request of the last finished pass took */
  lastPass?: { path: string; ms: number }[];
}

// per database handle, so apps over different databases in one process (tests) never mix
const states = new WeakMap<Db, WarmState>();

/** The warm-up's state for the app over `db`; undefined when no warm-up runs for it. */
export const warmStateOf = (db: Db): WarmState | undefined => states.get(db);

export interface AnswerWarmer {
  /** resolves when the warm-up under way (if any) has finished */
  idle(): Promise<void>;
  /** looks at the data version now rather than at the next tick */
  poke(): void;
  stop(): void;
}

/**
 * Precomputes answers after every load. Every `intervalMs` it reads the data state (one small query); when
 * the version has changed — a load or a refresh finished — it asks the server for each of `requests` in
 * turn, as a signed-in group-wide analyst would (`cookie`), with {@link FRESH_HEADER} so a route that would
 * answer from before (stale-while-revalidate) waits for the new answer; the caches then hold the new answers
 * before the first person asks. Runs once at start too. One request at a time, so pages others are using
 * keep a core.
 *
 * While uploads are under way it also keeps the threads they will need started (worker-pool.ts keepWarm).
 *
 * Two things keep it from computing answers that would be thrown away at once: while a load's exposure
 * refresh is on its way (`refreshPending`: the new lines without their engine hours) it waits, up to the
 * grace period of data-version.ts; and when the data changes during a pass, the pass stops and the next tick
 * starts again from the first request (the Overview).
 */
export function startAnswerWarmer(opts: {
  db: Db;
  origin: string;
  cookie: () => Promise<string>;
  requests?: readonly string[];
  intervalMs?: number;
  /** keep the import and scan threads warm while uploads are under way (default true) */
  warmThreads?: boolean;
}): AnswerWarmer {
  const requests = opts.requests ?? WARM_REQUESTS;
  const state: WarmState = { warmedFor: null, finishedAt: null, warming: null };
  states.set(opts.db, state);
  let session: { cookie: string; at: number } | null = null; // one session, renewed twice a day
  const cookie = async () => {
    if (!session || Date.now() - session.at > 12 * 3600_000) session = { cookie: await opts.cookie(), at: Date.now() };
    return session.cookie;
  };
  let running: Promise<void> = Promise.resolve();
  let busy = false;
  let again = false;
  let stopped = false;

  /**
   * Threads, every tick even during a pass: the import thread while an upload is under way, so its check and
   * its load find it started; the scan thread while a load runs, so the Overview's scan right after does.
   */
  let threadsBusy = false;
  function warmThreads(): void {
    if (opts.warmThreads === false || threadsBusy) return;
    threadsBusy = true;
    uploadsUnderWay(opts.db)
      .then((uploads) => {
        if (uploads.any) keepWarm(ETL_TASK_FILE);
        // an upload stays "loading" through its exposure refresh, until just before its answers are asked for
        if (uploads.loading) keepWarm(SCAN_TASK_FILE);
      })
      .catch((err: Error) => logger.warn({ err: err.message }, "thread warm-up failed"))
      .finally(() => (threadsBusy = false));
  }

  async function warm(): Promise<void> {
    const data = await dataState(opts.db);
    if (data.version === state.warmedFor?.version || data.refreshPending) return;
    const signedIn = await cookie();
    const started = performance.now();
    state.warming = data;
    const pass: { path: string; ms: number }[] = [];
    try {
      for (const [i, path] of requests.entries()) {
        if (stopped) return;
        // the data changed under the pass: these answers are already old; start again at the top
        if (i > 0 && (await dataState(opts.db)).version !== data.version) {
          again = true;
          return;
        }
        const t0 = performance.now();
        const res = await fetch(opts.origin + path, { headers: { Cookie: signedIn, "Accept-Encoding": "br, gzip", [FRESH_HEADER]: "1" } });
        await res.arrayBuffer();
        pass.push({ path, ms: Math.round(performance.now() - t0) });
        if (!res.ok) logger.warn({ path, status: res.status }, "answer warm-up: request failed");
      }
      state.warmedFor = data;
      state.finishedAt = new Date();
      state.lastPass = pass;
      logger.info({ version: data.version, ms: Math.round(performance.now() - started), pass }, "answers warmed for the current data");
    } finally {
      state.warming = null;
    }
  }

  const tick = () => {
    if (stopped) return;
    warmThreads();
    if (busy) return;
    busy = true;
    again = false;
    running = warm()
      .catch((err: Error) => logger.warn({ err: err.message }, "answer warm-up failed"))
      .finally(() => {
        busy = false;
        if (again && !stopped) setImmediate(tick);
      });
  };
  tick();
  const timer = setInterval(tick, opts.intervalMs ?? 1000);
  timer.unref();
  return {
    idle: () => running,
    poke: tick,
    stop: () => {
      stopped = true;
      clearInterval(timer);
      if (states.get(opts.db) === state) states.delete(opts.db);
    },
  };
}
