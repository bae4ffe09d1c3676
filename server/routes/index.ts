import { Router } from "express";
import type pg from "pg";
import type { Db } from "../db/database.js";
import { shopRoutes } from "./shops.js";
import { analyticsRateRoutes } from "./analytics-rates.js";
import { analyticsLifeRoutes } from "./analytics-life.js";
import { analyticsClusterRoutes } from "./analytics-clusters.js";
import { benchmarkRoutes } from "./benchmarks.js";
import { claimRoutes, type ClaimRouteDeps } from "./claims.js";
import { claimLifecycleRoutes } from "./claim-lifecycle.js";
import { claimStoryRoutes } from "./claim-story.js";
import { allow } from "../auth/require-user.js";
import { claimRoles } from "../../shared/roles.js";
import { repairCsvRoutes, repairRoutes } from "./repairs.js";
import { overviewRoutes } from "./overview.js";
import { clusterDetailRoutes } from "./analytics-cluster-detail.js";
import { batchRoutes, importRoutes } from "./imports.js";
import { findingRoutes } from "./findings.js";
import { benchSheetRoutes } from "./bench-sheet.js";
import { winterFittingRoutes } from "./winter-fitting.js";
import { winterRoutes } from "./winter.js";
import { digestRoutes } from "./digest.js";
import { adminEngineSpecRoutes, engineSpecRoutes } from "./admin-engine-specs.js";

/** Mounts the resource routers under /api. Each router declares its roles with allow(). */
export function apiRoutes(
  db: Db,
  pool: pg.Pool,
  services: Omit<ClaimRouteDeps, "db">,
  imports: { spoolDir: string; maxUploadBytes: number; databaseUrl?: string },
): Router {
  const router = Router();
  router.use("/shops", shopRoutes(db));
  router.use("/analytics/rates", analyticsRateRoutes(db));
  router.use("/analytics/life", analyticsLifeRoutes(db));
  router.use("/analytics/clusters", analyticsClusterRoutes(db));
  router.use("/benchmarks", benchmarkRoutes(db));
  // the money report, line inclusion and versions, and the story (narrative, notes) sit beside the claims
  // router behind the same roles; mounted first, as "/money" would otherwise be taken for a claim id
  router.use("/claims", allow(...claimRoles), claimLifecycleRoutes({ db, ...services }), claimStoryRoutes({ db, ...services }));
  router.use("/claims", claimRoutes({ db, ...services }));
  router.use("/analytics/clusters", clusterDetailRoutes(db));
  router.use("/repairs.csv", repairCsvRoutes(db, pool));
  router.use("/repairs", repairRoutes(db));
  router.use("/overview", overviewRoutes(db));
  router.use("/imports", importRoutes({ db, pool, storage: services.storage, boss: services.boss, ...imports }));
  router.use("/batches", batchRoutes({ db }));
  router.use("/findings", findingRoutes(db));
  router.use("/bench-sheet", benchSheetRoutes({ db, pool }));
  router.use("/winter/fitting", winterFittingRoutes(db));
  router.use("/winter", winterRoutes(db));
  router.use("/digest", digestRoutes(db));
  router.use("/admin/engine-specs", adminEngineSpecRoutes(db));
  router.use("/engine-specs", engineSpecRoutes(db));
  return router;
}
