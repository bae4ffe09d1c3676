import path from "node:path";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import type { Config } from "./config.js";
import { projectRoot } from "./config.js";
import { createDb, type Db } from "./db/database.js";
import { migrateToLatest } from "./db/migrate.js";
import { rebuildExposureIfCleared } from "../etl/index.js";
import { loadOrCreateSecrets } from "./secrets.js";
import { createDevProvider, listen } from "./auth/dev-provider.js";
import { createOidcClient } from "./auth/oidc-client.js";
import { createApp } from "./app.js";
import { startSmtpFake } from "./dev/smtp-fake.js";
import { startS3Fake } from "./dev/s3-fake.js";
import { createStorage, type Storage } from "./services/storage.js";
import { createMailer, type Mailer } from "./services/mailer.js";
import type { MailArchive } from "./services/mail-archive.js";
import { logger } from "./logger.js";
import { startImportWorkers } from "./services/imports/import-jobs.js";
import PgBoss from "pg-boss";
import { startSendWorker } from "./services/warranty/send.js";
import { startDigestSchedule } from "./services/digest/digest.js";
import { startAnswerWarmer } from "./services/answer-warmer.js";
import { serviceSessionCookie } from "./auth/service-session.js";
import type { SessionUser } from "./auth/session.js";
import type pg from "pg";

export interface Stack {
  db: Db;
  pool: pg.Pool;
  url: string;
  issuer: string;
  storage: Storage;
  mailer: Mailer;
  mailDir: string | null;
  close(): Promise<void>;
}

const closeServer = (s: Server) =>
  new Promise<void>((resolve) => {
    s.close(() => resolve());
    s.closeAllConnections?.();
  });

/**
 * Starts everything the product needs on loopback: the local identity provider, SMTP and S3 fakes
 * (each only when no real service is configured), migrates the database and serves app + API.
 */
/** Who the answer warm-up asks as: a group-wide analyst that exists only in this process. */
const WARM_UP_USER: SessionUser = { sub: "ironledger-warm-up", name: "Answer warm-up", email: null, roles: ["analyst"], shops: [] };

export async function startStack(config: Config, opts: { staticDir?: string } = {}): Promise<Stack> {
  const closers: (() => Promise<void>)[] = [];
  const closeAll = async () => {
    for (const c of closers.reverse()) await c().catch((err) => logger.warn({ err }, "shutdown step failed"));
  };
  try {
    const secrets = loadOrCreateSecrets(config.dataDir);
    const { db, pool } = createDb(config.databaseUrl);
    closers.push(() => db.destroy());
    await migrateToLatest(db);
    // a migration that changed the exposure's bands or grain empties it: rebuilt before the first answer
    const rebuilt = await rebuildExposureIfCleared(db);
    if (rebuilt) logger.info({ rows: rebuilt.rows, seconds: rebuilt.seconds }, "exposure rebuilt after a migration");

    let issuer = config.oidc.issuer;
    let clientSecret = config.oidc.clientSecret;
    if (!issuer) {
      issuer = `http://127.0.0.1:${config.oidc.localPort}`;
      clientSecret = secrets.clientSecret;
      const provider = createDevProvider({
        issuer,
        clientId: config.oidc.clientId,
        clientSecret,
        redirectUris: [`${config.publicUrl}/auth/callback`],
        postLogoutRedirectUris: [`${config.publicUrl}/signed-out`],
        signingKey: secrets.signingKey,
        cookieKeys: secrets.providerCookieKeys,
        rateLimits: config.rateLimits,
      });
      const server = await listen(provider, config.oidc.localPort);
      closers.push(() => closeServer(server));
    }
    if (!clientSecret) throw new Error("OIDC_CLIENT_SECRET is required when OIDC_ISSUER is set");

    let mailDir: string | null = null;
    let mailArchive: MailArchive | null = null;
    let smtpHost = config.smtp.host;
    let smtpPort = config.smtp.port;
    if (!smtpHost) {
      mailDir = path.join(config.dataDir, "mail");
      const smtp = await startSmtpFake(config.smtp.localPort, mailDir);
      closers.push(smtp.close);
      mailArchive = smtp.archive;
      smtpHost = "127.0.0.1";
      smtpPort = config.smtp.localPort;
    }
    const mailer = createMailer(smtpHost, smtpPort ?? 25, config.smtp.from);
    closers.push(async () => mailer.transport.close());

    let s3 = config.s3;
    if (!s3.endpoint) {
      const fake = await startS3Fake(s3.localPort, path.join(config.dataDir, "objects"), s3.bucket);
      closers.push(fake.close);
      s3 = { ...s3, endpoint: fake.endpoint, accessKeyId: secrets.s3AccessKeyId, secretAccessKey: secrets.s3SecretAccessKey };
    }
    const storage = createStorage(s3);
    await storage.ensureBucket();

    // the job queue (its own schema in the same database) that retries claim packets the mail server refused
    const boss = new PgBoss({ connectionString: config.databaseUrl, max: 3 });
    boss.on("error", (err) => logger.warn({ err }, "job queue error"));
    await boss.start();
    closers.push(() => boss.stop({ graceful: false, wait: true, timeout: 5000 }));
    await startSendWorker({ db, mailer, storage, boss });
    // the weekly digest: a daily run at 06:00 UTC sends each user theirs on the weekday they chose
    await startDigestSchedule({ db, mailer, boss, publicUrl: config.publicUrl });
    const imports = { spoolDir: path.join(config.dataDir, "uploads"), maxUploadBytes: config.maxUploadBytes, databaseUrl: config.databaseUrl };
    await startImportWorkers({ db, pool, storage, boss, spoolDir: imports.spoolDir, databaseUrl: config.databaseUrl });

    const app = createApp({
      db,
      pool,
      publicUrl: config.publicUrl,
      sessionSecret: secrets.sessionSecret,
      rateLimits: config.rateLimits,
      oidc: createOidcClient({ issuer, clientId: config.oidc.clientId, clientSecret }),
      issuer,
      scopes: config.oidc.scopes,
      rolesClaim: config.oidc.rolesClaim,
      shopsClaim: config.oidc.shopsClaim,
      staticDir: opts.staticDir ?? path.join(projectRoot, "dist"),
      storage,
      mailer,
      mailArchive,
      boss,
      imports,
    });
    const server = await listen(app, config.port, config.host);
    closers.push(() => closeServer(server));
    if (config.warmAnswers) {
      const { port } = server.address() as AddressInfo;
      const host = config.host === "0.0.0.0" || config.host === "::" ? "127.0.0.1" : config.host;
      const warmer = startAnswerWarmer({
        db,
        origin: `http://${host.includes(":") ? `[${host}]` : host}:${port}`,
        cookie: () => serviceSessionCookie(pool, secrets.sessionSecret, WARM_UP_USER),
      });
      closers.push(async () => warmer.stop());
    }

    return { db, pool, url: config.publicUrl, issuer, storage, mailer, mailDir, close: closeAll };
  } catch (err) {
    await closeAll();
    throw err;
  }
}
