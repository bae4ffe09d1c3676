import type { NextFunction, Request, Response } from "express";
import { forbidden, unauthorized } from "../errors.js";
import { groupWideRoles, type Role } from "../../shared/roles.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import type { SessionUser } from "./session.js";

declare module "express-serve-static-core" {
  interface Request {
    user?: SessionUser;
    scope?: ShopScope;
  }
}

/** The shops a user may see: the whole group for group-wide roles, otherwise the shops in their claim. */
export function scopeFor(user: Pick<SessionUser, "roles" | "shops">): ShopScope {
  if (user.roles.some((r) => groupWideRoles.includes(r))) return { kind: "all" };
  return { kind: "shops", shops: [...user.shops] };
}

/**
 * Every /api route declares the roles it allows. No session → 401; a role outside the list → 403.
 * Sets req.user and req.scope for the query layer.
 */
export function allow(...roles: Role[]) {
  return (req: Request, _res: Response, next: NextFunction) => {
    const user = req.session?.user;
    if (!user) return next(unauthorized());
    if (!user.roles.some((r) => roles.includes(r))) return next(forbidden(req.baseUrl + req.path));
    req.user = user;
    req.scope = scopeFor(user);
    next();
  };
}

/** Narrow helpers for the query layer. */
export function requireScope(req: Request): ShopScope {
  if (!req.scope) throw unauthorized();
  return req.scope;
}
export function requireUser(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}
