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
    /** the user requests act as: the provider's claims with any access stored in Ironledger applied (effective-user.ts) */
    user?: SessionUser;
    /** the identity provider's claims at sign-in */
    claims?: SessionUser;
    idToken?: string;
    login?: { state: string; nonce: string; codeVerifier: string; returnTo: string };
  }
}

/**
 * Sessions in PostgreSQL (table app_session, created by migration 0001). The store is the database: when it
 * fails (server stopped, connection refused or cut), the request answers 503 database_unavailable in words,
 * and the next request after the database is back reads its session as before.
 */
/** How often a session's expiry is written back (the cookie rolls on every answer; the stored row need not). */
const TOUCH_EVERY_MS = 60_000;

export function createSessionMiddleware(pool: pg.Pool, secret: string, secure: boolean): RequestHandler {
  const PgStore = connectPgSimple(session);
  /**
   * A store that writes a session's new expiry at most once a minute per session: with a rolling cookie,
   * express-session touches the row on every answer and waits for it, so one person's parallel requests
   * queued on that row. A row up to a minute behind its cookie expires up to a minute early, of 12 hours.
   */
  class ThrottledStore extends PgStore {
    private readonly touched = new Map<string, number>();
    override touch(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
      const now = Date.now();
      const last = this.touched.get(sid);
      if (last !== undefined && now - last < TOUCH_EVERY_MS) {
        cb?.();
        return;
      }
      this.touched.set(sid, now);
      if (this.touched.size > 10_000) for (const [k, t] of this.touched) if (now - t >= TOUCH_EVERY_MS) this.touched.delete(k);
      super.touch(sid, sess, cb as () => void);
    }
  }
  const middleware = session({
    name: "ironledger.sid",
    secret,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: secure,
    store: new ThrottledStore({
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
