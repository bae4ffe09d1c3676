import type { WarmState } from "./answer-warmer.js";
import type { BatchDashboards } from "../../shared/schemas/imports.js";

/** What "current for a batch" needs to know of the batch. */
export interface BatchMark {
  id: string;
  status: string;
  inserted: number;
  updated: number;
}

const big = (v: string | null | undefined): bigint => (v && /^\d+$/.test(v) ? BigInt(v) : 0n);

/**
 * Whether the dashboards (the answers the warm-up keeps: Overview, clusters, rates, life curves, benchmarks)
 * show batch `b`: the data they were last computed for holds the batch, and — when the batch changed rows —
 * the exposure refresh had folded it in by then (before that, its lines would count against engine hours
 * that leave them out). "current" with the time the warm-up finished; "updating" until then; null when
 * nothing can be said: no warm-up runs in this server (every answer is then computed when asked), or the
 * batch did not load.
 */
export function dashboardsFor(b: BatchMark, warm: WarmState | undefined): BatchDashboards | null {
  if (!warm || (b.status !== "loaded" && b.status !== "already_loaded")) return null;
  const w = warm.warmedFor;
  const id = big(b.id);
  const holds = w !== null && big(w.batch) >= id;
  const folded = b.status === "already_loaded" || b.inserted + b.updated === 0 || (w !== null && big(w.exposureBatch) >= id);
  if (holds && folded && warm.finishedAt) return { state: "current", asOf: warm.finishedAt.toISOString() };
  return { state: "updating", asOf: null };
}
