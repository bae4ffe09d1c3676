import { Router } from "express";
import type { Db } from "../db/database.js";

/** Mounts the resource routers under /api. Each router declares its roles with allow(). */
export function apiRoutes(_db: Db): Router {
  const router = Router();
  return router;
}
