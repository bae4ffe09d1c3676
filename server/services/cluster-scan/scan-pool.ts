/** The cluster scan on its worker thread (see worker-pool.ts). */
import path from "node:path";
import type { ScanSummary, ScanTask } from "./scan-task.js";
import { runOnWorker } from "../worker-pool.js";

export function scanOnWorker(task: ScanTask): Promise<ScanSummary> {
  return runOnWorker<ScanSummary>(path.join(import.meta.dirname, "scan-task.ts"), task);
}
