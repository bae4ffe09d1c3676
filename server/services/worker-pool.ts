/**
 * CPU-bound steps on worker threads (piscina), so seconds of JavaScript on a large warehouse — a cluster scan,
 * a life fit — never block the event loop that answers every other request. One thread per task module is
 * enough: answers are cached per data version, so only the first call after a load computes. The worker
 * loads the TypeScript module through tsx, as the server itself does, and exits 5 s after its last task, so
 * the memory a large task leaves behind (hundreds of MB at a million lines) goes back.
 */
import { Piscina } from "piscina";

const pools = new Map<string, Piscina>();

/** Runs the default export of `filename` (an absolute path) with `task` on that module's worker thread. */
export function runOnWorker<T>(filename: string, task: unknown): Promise<T> {
  let pool = pools.get(filename);
  if (!pool) {
    pool = new Piscina({ filename, execArgv: ["--import", "tsx"], minThreads: 0, maxThreads: 1, idleTimeout: 5_000 });
    pools.set(filename, pool);
  }
  return pool.run(task) as Promise<T>;
}
