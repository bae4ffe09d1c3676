import { Router } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { NEW_CLUSTERS_SHOWN, type DataAsOf, type Overview } from "../../shared/schemas/overview.js";
import { recordVisit, type LoadRow } from "../db/queries/overview.js";
import { listShops } from "../db/queries/shops.js";
import { clustersOf, findClusters, type ClusterFinding } from "../services/cluster-finder.js";
import { overviewSummary, type OverviewSummary } from "../services/overview-summary.js";
import { RevalidatingCache, wantsFresh, type Served } from "../services/revalidating-cache.js";
import { dataVersion, versionBatch } from "../db/queries/data-version.js";
import { logger } from "../logger.js";
import { analyticsRoles, findingReadRoles, type Role } from "../../shared/roles.js";
import { listFindingStates } from "../db/queries/findings.js";
import { findingNews } from "../analytics/finding-news.js";
import { findingsOf } from "../services/cluster-finder.js";
import { sql } from "kysely";

export const ATTENTION_DEFINITION =
  "Over the 365 days up to the latest repair order: one point per failure visit, two more per comeback (a visit for the same component within 30 days and 100 engine hours of the previous one's close) and three more per component with three or more visits (a repeat repair). Highest score first.";

function loadsByShop(rows: LoadRow[], names: Map<string, string>): Overview["loads"] {
  const groups = new Map<string | null, LoadRow[]>();
  for (const r of rows) groups.set(r.shopCode, [...(groups.get(r.shopCode) ?? []), r]);
  return [...groups]
    .sort(([a], [b]) => (a === null ? 1 : b === null ? -1 : a.localeCompare(b)))
    .map(([shopCode, files]) => {
      const finished = files.map((f) => f.finishedAt?.getTime() ?? 0).filter(Boolean);
      return {
        shopCode,
        shopName: shopCode === null ? "Group-wide files" : (names.get(shopCode) ?? shopCode),
        lastFinishedAt: finished.length ? new Date(Math.max(...finished)).toISOString() : null,
        rowsRead: files.reduce((s, f) => s + f.rowsRead, 0),
        rowsRejected: files.reduce((s, f) => s + f.rowsRejected, 0),
        files: files.map((f) => ({ ...f, finishedAt: f.finishedAt?.toISOString() ?? null })),
      };
    });
}

const asOf = (s: Served<unknown>): DataAsOf => {
  const b = versionBatch(s.version);
  return { batchId: b > 0n ? String(b) : null, computedAt: s.computedAt.toISOString(), current: s.current };
};

/**
 * GET /api/overview: what changed since the last load and the last visit. The warehouse summary and the
 * cluster scan are kept per shop scope and data version; after a load the previous ones are answered at
 * once, each marked with the data it was computed for (`asOf`, `clusters.asOf`), while the new ones are
 * computed in the background, so the page never waits for a scan (a request with `X-Answer-Fresh: 1`, as
 * the answer warm-up sends, waits for them). Shop names and the caller's visit are read per request.
 */
export function overviewRoutes(db: Db): Router {
  const router = Router();
  const warn = (err: unknown) => logger.warn({ err }, "overview: background computation failed");
  const summaries = new RevalidatingCache<OverviewSummary>(() => dataVersion(db), 50, warn);
  const scans = new RevalidatingCache<ClusterFinding>(() => dataVersion(db), 50, warn);
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    const user = requireUser(req);
    const waitFresh = wantsFresh(req);
    const key = JSON.stringify(scope);
    const [summary, shops, scan] = await Promise.all([
      summaries.get(key, () => overviewSummary(db, scope), { fresh: waitFresh }),
      listShops(db, scope),
      scans.get(key, () => findClusters(db, scope, {}), { fresh: waitFresh }),
    ]);
    const { loads, headlines, attention } = summary.value;
    const found = scan.value;
    const clusters = clustersOf(found);
    const visit = await recordVisit(db, user.sub, clusters.map((c) => c.id));
    const seen = new Set(visit.previousClusterIds ?? []);
    const fresh = clusters.filter((c) => !seen.has(c.id));
    const body: Overview = {
      findings: user.roles.some((r) => (findingReadRoles as readonly Role[]).includes(r)) ? await findingsSection(visit.previousVisitAt, found) : null,
      asOf: asOf(summary),
      loads: loadsByShop(loads, new Map(shops.map((s) => [s.code, s.name]))),
      headlines,
      clusters: {
        asOf: asOf(scan),
        firstVisit: visit.previousClusterIds === null,
        previousVisitAt: visit.previousVisitAt?.toISOString() ?? null,
        total: clusters.length,
        newCount: fresh.length,
        newSinceLastVisit: fresh.slice(0, NEW_CLUSTERS_SHOWN).map(({ repairLineIds: _ids, ...c }) => c),
      },
      attention: { windowEnd: attention.windowEnd, definition: ATTENTION_DEFINITION, machines: attention.rows },
    };
    res.json(body);
  });
  return router;

  /** Findings new or changed since the caller's last visit and since the last load, each linked to its lead in the current scan. */
  async function findingsSection(previousVisitAt: Date | null, found: ClusterFinding): Promise<NonNullable<Overview["findings"]>> {
    const [states, last] = await Promise.all([
      listFindingStates(db),
      sql<{ t: Date | null }>`SELECT max(finished_at) AS t FROM etl_batch WHERE status = 'loaded'`.execute(db),
    ]);
    const lastLoadAt = last.rows[0]?.t ?? null;
    const idOf = new Map(findingsOf(found).map((f) => [f.key, f.id]));
    const withId = (n: ReturnType<typeof findingNews>) => n.map((x) => ({ ...x, id: idOf.get(x.key) ?? null }));
    return {
      previousVisitAt: previousVisitAt?.toISOString() ?? null,
      lastLoadAt: lastLoadAt?.toISOString() ?? null,
      sinceVisit: withId(findingNews(states, previousVisitAt)),
      sinceLoad: withId(lastLoadAt ? findingNews(states, lastLoadAt) : []),
    };
  }
}
