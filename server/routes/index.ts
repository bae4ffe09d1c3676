import { Router } from "express";
import type { Db } from "../db/database.js";
import { shopRoutes } from "./shops.js";
import { analyticsRateRoutes } from "./analytics-rates.js";
import { analyticsLifeRoutes } from "./analytics-life.js";
import { analyticsClusterRoutes } from "./analytics-clusters.js";

/** Mounts the resource routers under /api. Each router declares its roles with allow(). */
export function apiRoutes(db: Db): Router {
  const router = Router();
  router.use("/shops", shopRoutes(db));
  router.use("/analytics/rates", analyticsRateRoutes(db));
  router.use("/analytics/life", analyticsLifeRoutes(db));
  router.use("/analytics/clusters", analyticsClusterRoutes(db));
  return router;
}
