import type { NextFunction, Request, Response } from "express";
import type { Role } from "../../shared/roles.js";
import { HttpError } from "../errors.js";
import type { SessionUser } from "./session.js";

/** What Ironledger stores about a user's access (app_user, migrations/0064); null when it has no row. */
export interface StoredAccess {
  /** roles and shops an administrator set; null while the identity provider's claims apply */
  access: { roles: Role[]; shops: string[] } | null;
  deactivated: boolean;
}

export const DEACTIVATED_MESSAGE =
  "An administrator has deactivated your Ironledger account, so you cannot sign in. Ask an administrator to reactivate it.";

/**
 * The user a request acts as: the provider's claims from sign-in, with roles and shops replaced by those an
 * administrator stored in Ironledger, when there are any (the rule in shared/schemas/admin.ts, ACCESS_RULE).
 */
export function effectiveUser(claims: SessionUser, stored: StoredAccess | null): SessionUser {
  if (!stored?.access) return claims;
  return { ...claims, roles: [...stored.access.roles], shops: [...stored.access.shops] };
}

const sameAccess = (a: SessionUser, b: SessionUser) =>
  a.roles.length === b.roles.length && a.roles.every((r, i) => r === b.roles[i]) && a.shops.length === b.shops.length && a.shops.every((s, i) => s === b.shops[i]);

/**
 * Stored access per user, read at most once per `ttlMs` per user in this process and forgotten at once when
 * an administrator changes it here; another server process sees a change within `ttlMs`.
 */
export function createAccessCache(read: (sub: string) => Promise<StoredAccess | null>, ttlMs = 5_000) {
  const entries = new Map<string, { at: number; value: Promise<StoredAccess | null> }>();
  return {
    get(sub: string): Promise<StoredAccess | null> {
      const now = Date.now();
      const hit = entries.get(sub);
      if (hit && now - hit.at < ttlMs) return hit.value;
      const value = read(sub);
      entries.set(sub, { at: now, value });
      value.catch(() => entries.delete(sub));
      if (entries.size > 10_000) for (const [k, e] of entries) if (now - e.at >= ttlMs) entries.delete(k);
      return value;
    },
    forget(sub: string): void {
      entries.delete(sub);
    },
  };
}
export type AccessCache = ReturnType<typeof createAccessCache>;

const regenerate = (req: Request) => new Promise<void>((ok, fail) => req.session.regenerate((e) => (e ? fail(e) : ok())));

/**
 * On every request with a session: the session's user becomes the effective user (claims kept apart in
 * `session.claims`), so `allow`, the scope and everything after read the access as it stands now, not as it
 * was at sign-in. A deactivated user's session is ended: /api answers 401 in words, /auth goes on signed out.
 */
export function applyStoredAccess(cache: AccessCache) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const s = req.session;
    const user = s?.user;
    if (!user) return next();
    const stored = await cache.get(user.sub);
    if (stored?.deactivated) {
      await regenerate(req);
      if (req.baseUrl === "/api" || req.originalUrl.startsWith("/api/")) return next(new HttpError(401, "account_deactivated", DEACTIVATED_MESSAGE));
      return next();
    }
    if (!s.claims) s.claims = user;
    const effective = effectiveUser(s.claims, stored);
    if (!sameAccess(effective, user)) s.user = effective;
    next();
  };
}
