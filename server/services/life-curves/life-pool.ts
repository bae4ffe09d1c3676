/** The life curves' fits on their worker thread (see worker-pool.ts). */
import path from "node:path";
import type { CostMcfResponse, KaplanMeierResponse, McfResponse, WeibullResponse } from "../../../shared/schemas/analytics-life.js";
import type { LifeTask } from "./life-task.js";
import { runOnWorker } from "../worker-pool.js";

const file = path.join(import.meta.dirname, "life-task.ts");

export function lifeOnWorker(task: Extract<LifeTask, { kind: "weibull" }>): Promise<WeibullResponse>;
export function lifeOnWorker(task: Extract<LifeTask, { kind: "kaplan-meier" }>): Promise<KaplanMeierResponse>;
export function lifeOnWorker(task: Extract<LifeTask, { kind: "mcf" }>): Promise<McfResponse>;
export function lifeOnWorker(task: Extract<LifeTask, { kind: "cost-mcf" }>): Promise<CostMcfResponse>;
export function lifeOnWorker(task: LifeTask): Promise<unknown> {
  return runOnWorker(file, task);
}
