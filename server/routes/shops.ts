import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { listShops } from "../db/queries/shops.js";
import { allRoles } from "../../shared/roles.js";
import type { ShopList } from "../../shared/schemas/shops.js";

/** GET /api/shops: the shops in the caller's scope. */
export function shopRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...allRoles), async (req, res) => {
    const body: ShopList = { shops: await listShops(db, requireScope(req)) };
    res.json(body);
  });
  return router;
}
