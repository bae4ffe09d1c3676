import session from "express-session";
import connectPgSimple from "connect-pg-simple";
import type pg from "pg";
import type { RequestHandler } from "express";
import type { Role } from "../../shared/roles.js";
import { databaseUnavailable } from "../errors.js";
import { logger } from "../logger.js";

export interface SessionUser {
  sub: string;
  name: string;
  email: string | null;
  roles: Role[];
  shops: string[];
}

declare module "express-session" {
  interface SessionData {
    user?: SessionUser;
    idToken?: string;
    login?: { state: string; nonce: string; codeVerifier: string; returnTo: string };
  }
}

/**
 * Sessions in PostgreSQL (table app_session, created by migration 0001). The store is the database: when it
 * fails (server stopped, connection refused or cut), the request answers 503 database_unavailable in words,
 * and the next request after the database is back reads its session as before.
 */
export function createSessionMiddleware(pool: pg.Pool, secret: string, secure: boolean): RequestHandler {
  const PgStore = connectPgSimple(session);
  const middleware = session({
    name: "ironledger.sid",
    secret,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: secure,
    store: new PgStore({
      pool,
      tableName: "app_session",
      createTableIfMissing: false,
      pruneSessionInterval: 60 * 15,
      // a failed prune is tried again at the next interval
      errorLog: (msg: string, err: unknown) => logger.warn({ err: (err as Error)?.message }, msg),
    }),
    cookie: { httpOnly: true, sameSite: "lax", secure, maxAge: 12 * 3600 * 1000 },
  });
  return (req, res, next) =>
    middleware(req, res, (err?: unknown) => {
      if (err === undefined || err === null) return next();
      // express-session passes only its store's errors on (reading, saving or touching the session)
      logger.warn({ err: (err as Error)?.message, requestId: res.locals.requestId }, "session store failed");
      next(databaseUnavailable());
    });
}
