import express from "express";
import { compressResponses } from "./http/compression.js";
import helmet from "helmet";
import { pinoHttp } from "pino-http";
import { sameOriginOnly } from "./http/same-origin.js";
import { refuseNul } from "./http/no-nul.js";
import { uploadLimit } from "./http/rate-limits.js";
import { defaultRateLimits, type RateLimits } from "./config.js";
import path from "node:path";
import os from "node:os";
import { existsSync } from "node:fs";
import { dataEtag } from "./http/data-etag.js";
import { serveClient } from "./http/static-files.js";
import type pg from "pg";
import type { Db } from "./db/database.js";
import { logger } from "./logger.js";
import { apiNotFound, errorHandler, requestId } from "./middleware/error-handler.js";
import { createSessionMiddleware } from "./auth/session.js";
import { authRoutes } from "./auth/routes.js";
import type { OidcClient } from "./auth/oidc-client.js";
import { storedAccess, upsertUser } from "./db/queries/users.js";
import { applyStoredAccess, createAccessCache, DEACTIVATED_MESSAGE } from "./auth/effective-user.js";
import { healthRoutes } from "./routes/health.js";
import { meRoutes } from "./routes/me.js";
import { adminUserRoutes } from "./routes/admin-users.js";
import { adminShopRoutes } from "./routes/admin-shops.js";
import { adminProfileRoutes } from "./routes/admin-profiles.js";
import { adminWarrantyPolicyRoutes } from "./routes/admin-warranty-policies.js";
import { apiRoutes } from "./routes/index.js";
import { adminMailRoutes } from "./routes/admin-mail.js";
import { adminSettingsRoutes } from "./routes/admin-settings.js";
import { settingsRoutes } from "./routes/settings.js";
import type { Storage } from "./services/storage.js";
import type { Mailer } from "./services/mailer.js";
import type { MailArchive } from "./services/mail-archive.js";
import type PgBoss from "pg-boss";

export interface AppDeps {
  db: Db;
  pool: pg.Pool;
  publicUrl: string;
  sessionSecret: string;
  oidc: OidcClient;
  issuer: string;
  scopes: string;
  rolesClaim: string;
  shopsClaim: string;
  /** folder of the built client (dist/); omitted in API-only tests */
  staticDir?: string;
  /** object storage for claim attachments; omitted in API tests that attach nothing */
  storage?: Storage;
  /** outgoing mail for claim packets */
  mailer?: Mailer;
  /** the mail the local SMTP fake captured; null or omitted with a real mail server */
  mailArchive?: MailArchive | null;
  /** the job queue that retries failed packet sends */
  boss?: PgBoss | null;
  /** where uploaded exports are spooled, and the largest accepted (defaults: the system's temp folder, 200 MB) */
  imports?: { spoolDir: string; maxUploadBytes: number; databaseUrl?: string };
  /** sign-in and upload limits (server/http/rate-limits.ts); omitted → the defaults in config.ts */
  rateLimits?: RateLimits;
}

/** The largest export file an upload accepts unless configured (MAX_UPLOAD_MB). */
export const DEFAULT_MAX_UPLOAD_BYTES = 200 * 1024 * 1024;

/** Builds the Express app without listening: index.ts and the tests both use it. */
export function createApp(d: AppDeps): express.Express {
  const app = express();
  const secure = d.publicUrl.startsWith("https:");
  app.disable("x-powered-by");
  if (secure) app.set("trust proxy", 1);
  app.use(requestId);
  app.use(pinoHttp({ logger, genReqId: (_req, res) => res.getHeader("x-request-id") as string, autoLogging: { ignore: (req) => req.url === "/api/health" } }));
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          "upgrade-insecure-requests": secure ? [] : null,
          "form-action": ["'self'", new URL(d.issuer).origin],
          "img-src": ["'self'", "data:", "blob:"],
        },
      },
      strictTransportSecurity: secure,
      // the Origin of our own form posts stays our origin (under no-referrer browsers send "null"), and no
      // address of ours leaves for another site
      referrerPolicy: { policy: "same-origin" },
    }),
  );
  // brotli or gzip for JSON, CSV, JS and CSS when the client accepts it (responses under 1 kB go as they are)
  app.use(compressResponses());
  // nothing a browser sends from another site changes anything (before the body parsers and every route)
  app.use(sameOriginOnly(d.publicUrl));
  // private answers are not kept by browsers or proxies; the warehouse answers that carry a data-version ETag
  // say `private, no-cache` instead (server/http/data-etag.ts), so a browser may keep and revalidate them
  app.use(["/api", "/auth"], (_req, res, next) => {
    res.setHeader("Cache-Control", "no-store");
    next();
  });
  app.use(express.json({ limit: "1mb" }));
  app.use(refuseNul);
  // before the session middleware: health answers (503, per dependency) while the session store, the database, does not
  app.use("/api/health", healthRoutes({ db: d.db, storage: d.storage, mailer: d.mailer }));
  // only the API and sign-in read sessions: the client's files load while the database is down, and say so in words
  app.use(["/api", "/auth"], createSessionMiddleware(d.pool, d.sessionSecret, secure));
  // roles and shops an admin stored in Ironledger replace the provider's on every request, not only at sign-in
  const access = createAccessCache((sub) => storedAccess(d.db, sub));
  app.use(["/api", "/auth"], applyStoredAccess(access));

  app.use(
    "/auth",
    express.urlencoded({ extended: false }),
    authRoutes({
      oidc: d.oidc,
      publicUrl: d.publicUrl,
      scopes: d.scopes,
      rolesClaim: d.rolesClaim,
      shopsClaim: d.shopsClaim,
      onSignIn: (u) => upsertUser(d.db, u),
      admit: async (u) => ((await storedAccess(d.db, u.sub))?.deactivated ? DEACTIVATED_MESSAGE : null),
      rateLimits: d.rateLimits ?? defaultRateLimits,
    }),
  );

  app.use("/api/me", meRoutes());
  app.use("/api/settings", settingsRoutes(d.db));
  app.use("/api/admin/settings", adminSettingsRoutes(d.db));
  app.use("/api/admin/users", adminUserRoutes(d.db, access));
  app.use("/api/admin/shops", adminShopRoutes(d.db, d.pool));
  app.use("/api/admin/profiles", adminProfileRoutes(d.db, d.pool, d.imports?.spoolDir ?? path.join(os.tmpdir(), "ironledger-uploads")));
  app.use("/api/admin/mail", adminMailRoutes(d.mailArchive ?? null));
  app.use("/api/admin/warranty-policies", adminWarrantyPolicyRoutes(d.db));
  // answers computed from the warehouse alone: 304 while the data has not changed since the client's copy
  app.use(["/api/analytics", "/api/repairs"], dataEtag(d.db));
  // uploads per signed-in user, counted before the claim router reads the file
  app.post("/api/claims/:id/attachments", uploadLimit(d.rateLimits ?? defaultRateLimits));
  app.post("/api/imports", uploadLimit(d.rateLimits ?? defaultRateLimits));
  app.use("/api", apiRoutes(d.db, d.pool, { storage: d.storage, mailer: d.mailer, boss: d.boss }, {
    spoolDir: d.imports?.spoolDir ?? path.join(os.tmpdir(), "ironledger-uploads"),
    maxUploadBytes: d.imports?.maxUploadBytes ?? DEFAULT_MAX_UPLOAD_BYTES,
    databaseUrl: d.imports?.databaseUrl,
  }));
  app.use("/api", apiNotFound);

  if (d.staticDir && existsSync(path.join(d.staticDir, "index.html"))) {
    serveClient(app, d.staticDir);
  }
  app.use(errorHandler);
  return app;
}
