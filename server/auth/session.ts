import session from "express-session";
import connectPgSimple from "connect-pg-simple";
import type pg from "pg";
import type { Role } from "../../shared/roles.js";

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

/** Sessions in PostgreSQL (table app_session, created by migration 0001). */
export function createSessionMiddleware(pool: pg.Pool, secret: string, secure: boolean) {
  const PgStore = connectPgSimple(session);
  return session({
    name: "ironledger.sid",
    secret,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: secure,
    store: new PgStore({ pool, tableName: "app_session", createTableIfMissing: false, pruneSessionInterval: 60 * 15 }),
    cookie: { httpOnly: true, sameSite: "lax", secure, maxAge: 12 * 3600 * 1000 },
  });
}
