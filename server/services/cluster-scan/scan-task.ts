/**
 * The cluster scan's CPU work — building every cell of the cube and testing it — as one function of plain
 * data, so it can run on a worker thread (scan-pool.ts) and never hold up the requests on the main one.
 */
import { buildScanCells, type Standardisation } from "../../analytics/cluster-cells.js";
import { scanClusters, type ClusterScanResult } from "../../analytics/cluster-scan.js";
import type { CubeRow } from "../../analytics/cluster-cells.js";
import { hourBandLabel, temperatureBandLabel } from "../../../shared/bands.js";

export interface ScanTask {
  rows: CubeRow[];
  standardise: Standardisation;
  subject: string;
  qThreshold: number;
}

export function runScan(t: ScanTask): ClusterScanResult {
  const cells = buildScanCells(t.rows, t.standardise);
  return scanClusters(cells, {
    subject: t.subject,
    qThreshold: t.qThreshold,
    labels: { temperatureBand: (id) => temperatureBandLabel(id, "F"), hourBand: hourBandLabel },
  });
}

export default runScan;
