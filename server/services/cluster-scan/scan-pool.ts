/** The cluster scan on its worker thread (see worker-pool.ts). */
import path from "node:path";
import type { ScanSummary, ScanTask } from "./scan-task.js";
import { runOnWorker } from "../worker-pool.js";

/** The scan's task module, whose thread worker-pool.ts keeps. */
export const SCAN_TASK_FILE = path.join(import.meta.dirname, "scan-task.ts");

export function scanOnWorker(task: ScanTask): Promise<ScanSummary> {
  return runOnWorker<ScanSummary>(SCAN_TASK_FILE, task);
}
