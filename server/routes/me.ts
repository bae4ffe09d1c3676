import { Router } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import { allRoles } from "../../shared/roles.js";
import type { Me } from "../../shared/schemas/me.js";

export function meRoutes(): Router {
  const router = Router();
  router.get("/", allow(...allRoles), (req, res) => {
    const u = requireUser(req);
    const body: Me = { sub: u.sub, name: u.name, email: u.email, roles: u.roles, scope: requireScope(req) };
    res.json(body);
  });
  return router;
}
