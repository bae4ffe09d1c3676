import { Router } from "express";
import { sql } from "kysely";
import type { Db } from "../db/database.js";

/** GET /api/health: 200 {"status":"ok"} when the database answers, 503 otherwise. No sign-in needed. */
export function healthRoutes(db: Db): Router {
  const router = Router();
  router.get("/", async (_req, res) => {
    try {
      await sql`select 1`.execute(db);
      res.json({ status: "ok" });
    } catch {
      res.status(503).json({ status: "unavailable" });
    }
  });
  return router;
}
