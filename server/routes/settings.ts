import { Router } from "express";
import { allow } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { readSettings } from "../db/queries/settings.js";
import { allRoles } from "../../shared/roles.js";

/** GET /api/settings: the group-wide settings every signed-in role formats with (the currency money is shown in). */
export function settingsRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...allRoles), async (_req, res) => {
    res.json(await readSettings(db));
  });
  return router;
}
