import { Router } from "express";
import { createHash } from "node:crypto";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { clusterQuerySchema, type ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { scanCells } from "../db/queries/analytics-clusters.js";
import { buildScanCells } from "../analytics/cluster-cells.js";
import { scanClusters, type ClusterScanResult } from "../analytics/cluster-scan.js";
import { ResultCache } from "../services/result-cache.js";
import { dataVersion } from "../db/queries/data-version.js";
import { components } from "../../shared/catalog.js";
import { hourBandLabel, temperatureBandLabel } from "../../shared/bands.js";
import { ANALYTICS_ROLES } from "./analytics-rates.js";

export const COLD_START_AIDS = components.filter((c) => c.coldStartAid).map((c) => c.code);

function subjectFor(codes: string[]): string {
  if (codes.length === COLD_START_AIDS.length && codes.every((c) => COLD_START_AIDS.includes(c))) return "Cold-start aids";
  return codes.map((c) => components.find((x) => x.code === c)?.name ?? c).join(" / ");
}

/** A stable id for a cluster: a hash of its dimensions and the components scanned. */
export const clusterId = (components: string[], dims: unknown) =>
  createHash("sha256").update(JSON.stringify([components, dims])).digest("hex").slice(0, 16);

export function analyticsClusterRoutes(db: Db): Router {
  const router = Router();
  const cache = new ResultCache<ClusterScanResult>(50);
  router.get("/", allow(...ANALYTICS_ROLES), async (req, res) => {
    const q = clusterQuerySchema.parse(req.query);
    const comps = q.components ?? COLD_START_AIDS;
    const f = analyticsFiltersSchema.parse({ ...req.query, components: comps.join(",") });
    const scope = requireScope(req);
    const key = JSON.stringify([scope, f, q.standardise, q.q]);
    const scan = await cache.get(key, await dataVersion(db), async () => {
      const rows = await scanCells(db, scope, f);
      const cells = buildScanCells(rows.map((r) => ({ ...r, repairLineIds: r.repairLineKeys })), q.standardise);
      return scanClusters(cells, {
        subject: subjectFor(comps),
        qThreshold: q.q,
        labels: { temperatureBand: (id) => temperatureBandLabel(id, "F"), hourBand: hourBandLabel },
      });
    });
    const body: ClusterList = {
      components: comps,
      method:
        q.standardise === "hour+temperature"
          ? "Expected failures from the scanned group's own rates per engine hour in each hour band × temperature band (indirect standardisation), so cold weather alone is not a cluster; one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested."
          : "Expected failures from the scanned group's own rates per engine hour in each hour band (indirect standardisation); one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested.",
      caution: "A cluster is an association in the data, a place to look: confirm it against the repair lines and the parts before acting on it.",
      cellsTested: scan.tested.length,
      qThreshold: scan.qThreshold,
      clusters: scan.signals.slice(0, q.limit).map((s) => ({
        id: clusterId(comps, s.dimensions),
        rank: s.rank,
        description: s.description,
        dimensions: s.dimensions,
        observed: s.observed,
        expected: s.expected,
        ratio: s.ratio.ratio,
        lower: s.ratio.lower,
        upper: s.ratio.upper,
        pValue: s.pValue,
        qValue: s.qValue,
        repairLineIds: [...s.repairLineIds],
        absorbed: s.absorbed.length,
      })),
    };
    res.json(body);
  });
  return router;
}
