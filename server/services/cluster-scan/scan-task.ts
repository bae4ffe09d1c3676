/**
 * The cluster scan's CPU work — building every cell of the cube and testing it — as one function of plain
 * data, so it can run on a worker thread (scan-pool.ts) and never hold up the requests on the main one.
 */
import { buildScanCells, failureIdsIn, type Standardisation } from "../../analytics/cluster-cells.js";
import { scanClusters, type ClusterScanResult } from "../../analytics/cluster-scan.js";
import type { CubeRow } from "../../analytics/cluster-cells.js";
import { hourBandLabel, temperatureBandLabel } from "../../../shared/bands.js";

export interface ScanTask {
  rows: CubeRow[];
  standardise: Standardisation;
  subject: string;
  qThreshold: number;
}

/** What the scan hands back to the server: its signals with their repair lines, and the counts around them. */
export type ScanSummary = Pick<ClusterScanResult, "signals" | "qThreshold" | "level"> & { cellsTested: number; cellsDropped: number };

export function runScan(t: ScanTask): ScanSummary {
  // cells without repair-line keys: only the kept signals need them, looked up after the test
  const cells = buildScanCells(t.rows, t.standardise, { withIds: false });
  const scan = scanClusters(cells, {
    subject: t.subject,
    qThreshold: t.qThreshold,
    labels: { temperatureBand: (id) => temperatureBandLabel(id, "F"), hourBand: hourBandLabel },
  });
  return {
    signals: scan.signals.map((s) => ({ ...s, repairLineIds: failureIdsIn(t.rows, s.dimensions) })),
    qThreshold: scan.qThreshold,
    level: scan.level,
    cellsTested: scan.tested.length,
    cellsDropped: scan.dropped.length,
  };
}

export default runScan;
