/**
 * CPU-bound steps on worker threads (piscina), so seconds of JavaScript on a large warehouse — a cluster scan,
 * a life fit — never block the event loop that answers every other request. One thread per task module is
 * enough: answers are cached per data version, so only the first call after a load computes. The worker
 * loads the TypeScript module through tsx, as the server itself does, and exits 5 s after its last task, so
 * the memory a large task leaves behind (hundreds of MB at a million lines) goes back.
 *
 * Starting a thread costs 0.7–1.6 s (a new V8 isolate, tsx, the module graph): {@link keepWarm} starts one
 * ahead of need, or keeps it from exiting, while work for it is on its way (the answer warm-up calls it while
 * uploads are being checked or loaded; see answer-warmer.ts).
 */
import { Piscina } from "piscina";

const pools = new Map<string, Piscina>();
const pinging = new Set<string>();

function poolFor(filename: string): Piscina {
  let pool = pools.get(filename);
  if (!pool) {
    pool = new Piscina({ filename, execArgv: ["--import", "tsx"], minThreads: 0, maxThreads: 1, idleTimeout: 5_000 });
    pools.set(filename, pool);
  }
  return pool;
}

/** Runs the default export of `filename` (an absolute path) with `task` on that module's worker thread. */
export function runOnWorker<T>(filename: string, task: unknown): Promise<T> {
  return poolFor(filename).run(task) as Promise<T>;
}

/**
 * Starts the thread of `filename` if none runs, or restarts its idle clock: the module's `ping` export (a
 * function that does nothing) runs on it. A ping is skipped while the last one has not come back (the thread
 * is busy with real work, which keeps it alive anyway).
 */
export function keepWarm(filename: string): void {
  if (pinging.has(filename)) return;
  pinging.add(filename);
  void poolFor(filename)
    .run(null, { name: "ping" })
    .catch(() => undefined)
    .finally(() => pinging.delete(filename));
}
