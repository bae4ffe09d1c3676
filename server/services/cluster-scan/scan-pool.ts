/**
 * Runs the cluster scan on a worker thread (piscina), so a cold scan — seconds of JavaScript on a large
 * warehouse — never blocks the event loop that answers every other request. One worker is enough: scans are
 * cached per data version, so only the first call after a load computes. The worker loads the TypeScript
 * task through tsx, as the server itself does.
 */
import path from "node:path";
import { Piscina } from "piscina";
import type { ScanSummary, ScanTask } from "./scan-task.js";

let pool: Piscina | null = null;

function scanPool(): Piscina {
  pool ??= new Piscina({
    filename: path.join(import.meta.dirname, "scan-task.ts"),
    execArgv: ["--import", "tsx"],
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 5_000, // a scan leaves a large heap behind: the thread exits soon after, and its memory goes with it
  });
  return pool;
}

export function scanOnWorker(task: ScanTask): Promise<ScanSummary> {
  return scanPool().run(task) as Promise<ScanSummary>;
}
