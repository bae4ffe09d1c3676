import type { Db } from "../db/database.js";
import { dataVersion } from "../db/queries/data-version.js";
import { logger } from "../logger.js";

/**
 * The group-wide answers the analyst's and the director's pages open with (the same paths and query strings
 * the pages ask for, so the answers land under the keys the pages will look up).
 */
export const WARM_REQUESTS = [
  "/api/analytics/clusters",
  "/api/overview",
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

export interface AnswerWarmer {
  /** resolves when the warm-up under way (if any) has finished */
  idle(): Promise<void>;
  stop(): void;
}

/**
 * Precomputes answers after every load. Every `intervalMs` it reads the data version (one small query); when
 * it has changed — a load or a refresh finished — it asks the server for each of `requests` in turn, as a
 * signed-in group-wide analyst would (`cookie`), so the caches hold the new answers before the first person
 * asks. Runs once at start too. One request at a time, so pages others are using keep a core.
 */
export function startAnswerWarmer(opts: {
  db: Db;
  origin: string;
  cookie: () => Promise<string>;
  requests?: readonly string[];
  intervalMs?: number;
}): AnswerWarmer {
  const requests = opts.requests ?? WARM_REQUESTS;
  let warmedFor: string | null = null;
  let session: { cookie: string; at: number } | null = null; // one session, renewed twice a day
  const cookie = async () => {
    if (!session || Date.now() - session.at > 12 * 3600_000) session = { cookie: await opts.cookie(), at: Date.now() };
    return session.cookie;
  };
  let running: Promise<void> = Promise.resolve();
  let busy = false;
  let stopped = false;

  async function warm(): Promise<void> {
    const version = await dataVersion(opts.db);
    if (version === warmedFor) return;
    const signedIn = await cookie();
    const started = performance.now();
    for (const path of requests) {
      if (stopped) return;
      const res = await fetch(opts.origin + path, { headers: { Cookie: signedIn, "Accept-Encoding": "br, gzip" } });
      await res.arrayBuffer();
      if (!res.ok) logger.warn({ path, status: res.status }, "answer warm-up: request failed");
    }
    warmedFor = version;
    logger.info({ version, ms: Math.round(performance.now() - started) }, "answers warmed for the current data");
  }

  const tick = () => {
    if (busy || stopped) return;
    busy = true;
    running = warm()
      .catch((err: Error) => logger.warn({ err: err.message }, "answer warm-up failed"))
      .finally(() => (busy = false));
  };
  tick();
  const timer = setInterval(tick, opts.intervalMs ?? 3000);
  timer.unref();
  return {
    idle: () => running,
    stop: () => {
      stopped = true;
      clearInterval(timer);
    },
  };
}
