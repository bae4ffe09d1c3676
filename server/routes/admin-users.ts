import { Router } from "express";
import { allow } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { listUsers } from "../db/queries/users.js";
import type { AdminUserList } from "../../shared/schemas/admin.js";
import type { Role } from "../../shared/roles.js";

/** GET /api/admin/users: everyone who has signed in, with roles and shop scope. Admin only. */
export function adminUserRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow("admin"), async (_req, res) => {
    const rows = await listUsers(db);
    const body: AdminUserList = {
      users: rows.map((r) => ({
        sub: r.sub,
        name: r.name,
        email: r.email,
        roles: r.roles as Role[],
        shops: r.shops,
        firstSeen: r.first_seen.toISOString(),
        lastSeen: r.last_seen.toISOString(),
      })),
    };
    res.json(body);
  });
  return router;
}
