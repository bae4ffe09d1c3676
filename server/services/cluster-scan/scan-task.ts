/**
 * The cluster scan's CPU work — building every cell of the cube and testing it — as one function of plain
 * data, so it can run on a worker thread (scan-pool.ts) and never hold up the requests on the main one.
 */
import { buildPartCells, buildScanCells, failureIdsIn, type Standardisation } from "../../analytics/cluster-cells.js";
import { scanClusters, type ClusterScanResult } from "../../analytics/cluster-scan.js";
import type { CubeRow } from "../../analytics/cluster-cells.js";
import { hourBandLabel, temperatureBandLabel } from "../../../shared/bands.js";
import { components } from "../../../shared/catalog.js";

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
  const options = {
    subject: t.subject,
    qThreshold: t.qThreshold,
    labels: {
      component: (code: string) => components.find((c) => c.code === code)?.name ?? code,
      // in the band's own unit (the scan ran in the bands of one unit); the API words them again in the caller's
      temperatureBand: (id: string) => temperatureBandLabel(id),
      hourBand: hourBandLabel,
    },
  };
  // rows labelled with a part: a scan part by part, each part's cells tested as a family of their own (one
  // question per part: the false-discovery control of one part is not loosened by another part's strong signals);
  // rows without: the parts together, the system level
  const parts = [...new Set(t.rows.map((r) => r.component ?? ""))].sort();
  const scans = parts.map((part) => {
    const rows = part ? t.rows.filter((r) => r.component === part) : t.rows;
    return { rows, scan: scanClusters(part ? buildPartCells(rows, t.standardise, { withIds: false }) : buildScanCells(rows, t.standardise, { withIds: false }), options) };
  });
  const signals = scans
    .flatMap(({ rows, scan }) => scan.signals.map((s) => ({ ...s, repairLineIds: failureIdsIn(rows, s.dimensions) })))
    .sort((a, b) => a.pValue - b.pValue || b.observed - b.expected - (a.observed - a.expected))
    .map((s, i) => ({ ...s, rank: i + 1 }));
  return {
    signals,
    qThreshold: t.qThreshold,
    level: scans[0]?.scan.level ?? 0.95,
    cellsTested: scans.reduce((n, x) => n + x.scan.tested.length, 0),
    cellsDropped: scans.reduce((n, x) => n + x.scan.dropped.length, 0),
  };
}

export default runScan;

/** Does nothing: run by worker-pool.ts's keepWarm, so the thread is up before a load's scan is asked for. */
export function ping(): true {
  return true;
}
