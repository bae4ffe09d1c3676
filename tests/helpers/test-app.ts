import { randomBytes } from "node:crypto";
import { serviceSessionCookie } from "../../server/auth/service-session.js";
import { createApp } from "../../server/app.js";
import { createOidcClient } from "../../server/auth/oidc-client.js";
import { freshDemoDb, freshTestDb, type TestDb } from "./test-db.js";
import type { Role } from "../../shared/roles.js";
import type { Db } from "../../server/db/database.js";

export const SESSION_SECRET = "test-session-secret";

export interface TestApp extends TestDb {
  app: ReturnType<typeof createApp>;
  /** A session cookie for a user with these roles and shops, stored the way express-session stores it. */
  signInAs(user: { roles: Role[]; shops?: string[]; sub?: string; name?: string }): Promise<string>;
}

/** createApp over a database as the API tests make it: stored sessions, an OIDC issuer never contacted. */
export function appOver(
  d: { db: Db; pool: TestDb["pool"] },
  extra: Partial<Pick<Parameters<typeof createApp>[0], "imports" | "storage">> = {},
): ReturnType<typeof createApp> {
  const issuer = "http://127.0.0.1:9"; // never contacted by API tests
  return createApp({
    db: d.db,
    pool: d.pool,
    publicUrl: "http://127.0.0.1:8080",
    sessionSecret: SESSION_SECRET,
    oidc: createOidcClient({ issuer, clientId: "test", clientSecret: "test" }),
    issuer,
    scopes: "openid",
    rolesClaim: "roles",
    shopsClaim: "shops",
    ...extra,
  });
}

/**
 * createApp over a fresh migrated database (with `demo: true`, one holding the demo world at scale 1);
 * sign-in goes through a stored session (tests/e2e walks the real OIDC flow).
 */
export async function testApp(o: { demo?: boolean } = {}): Promise<TestApp> {
  const tdb = o.demo ? await freshDemoDb() : await freshTestDb();
  const app = appOver(tdb);
  return {
    ...tdb,
    app,
    async signInAs(user) {
      // the server's own session minting (a stored session and express-session's signed cookie)
      return serviceSessionCookie(tdb.pool, SESSION_SECRET, {
        sub: user.sub ?? `test-${randomBytes(3).toString("hex")}`,
        name: user.name ?? "Test User",
        email: null,
        roles: user.roles,
        shops: user.shops ?? [],
      }, 1);
    },
  };
}

/** Two shops for scope tests (invented). */
export async function seedShops(db: Db, shops: { code: string; name: string }[]): Promise<void> {
  await db
    .insertInto("dim_shop")
    .values(shops.map((s, i) => ({ shop_key: 1000 + i, shop_code: s.code, name: s.name, region: null, town: null, lat: null, lon: null, climate_zone: null, time_zone: null, weather_station: null, export_profile: null })))
    .execute();
}
