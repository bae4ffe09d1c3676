import { z } from "zod";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

const port = z.coerce.number().int().min(1).max(65535);
const bool = z.enum(["0", "1", "true", "false"]).transform((v) => v === "1" || v === "true");
const limit = z.coerce.number().int().min(1).max(1_000_000);

/** Request limits (server/http/rate-limits.ts); each can be set from the environment (README.md). */
export interface RateLimits {
  /** minutes over which failed sign-ins and sign-in starts are counted */
  signInWindowMinutes: number;
  /** failed sign-ins for one account name from one address */
  signInFailuresPerAccountAndAddress: number;
  /** failed sign-ins for one account name from every address together */
  signInFailuresPerAccount: number;
  /** failed sign-ins from one address, whatever the account name */
  signInFailuresPerAddress: number;
  /** sign-ins started (GET /auth/login, each a stored session) from one address */
  signInStartsPerAddress: number;
  /** minutes over which claim attachment uploads are counted */
  uploadWindowMinutes: number;
  /** claim attachment uploads by one signed-in user */
  uploadsPerUser: number;
}

export const defaultRateLimits: RateLimits = {
  signInWindowMinutes: 15,
  signInFailuresPerAccountAndAddress: 10,
  signInFailuresPerAccount: 100,
  signInFailuresPerAddress: 50,
  signInStartsPerAddress: 300,
  uploadWindowMinutes: 10,
  uploadsPerUser: 30,
};

const envSchema = z.object({
  PORT: port.default(8080),
  HOST: z.string().default("127.0.0.1"),
  PUBLIC_URL: z.url().optional(),
  PGPORT: port.default(54329),
  DATABASE_URL: z.string().optional(),
  DATA_DIR: z.string().default(path.join(projectRoot, ".data")),
  OIDC_ISSUER: z.url().optional(),
  OIDC_CLIENT_ID: z.string().default("ironledger-web"),
  OIDC_CLIENT_SECRET: z.string().optional(),
  OIDC_ROLES_CLAIM: z.string().default("roles"),
  OIDC_SHOPS_CLAIM: z.string().default("shops"),
  OIDC_SCOPES: z.string().default("openid profile email ironledger"),
  LOCAL_OIDC_PORT: port.default(8081),
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: port.optional(),
  LOCAL_SMTP_PORT: port.default(2525),
  MAIL_FROM: z.string().default("Ironledger <no-reply@ironledger.invalid>"),
  S3_ENDPOINT: z.url().optional(),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().default("ironledger-evidence"),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  LOCAL_S3_PORT: port.default(4569),
  LOAD_DEMO: bool.default(true),
  WARM_ANSWERS: bool.default(true),
  MAX_UPLOAD_MB: z.coerce.number().int().min(1).max(10_000).default(200),
  SIGN_IN_LIMIT_WINDOW_MINUTES: limit.default(defaultRateLimits.signInWindowMinutes),
  SIGN_IN_FAILURES_PER_ACCOUNT_AND_ADDRESS: limit.default(defaultRateLimits.signInFailuresPerAccountAndAddress),
  SIGN_IN_FAILURES_PER_ACCOUNT: limit.default(defaultRateLimits.signInFailuresPerAccount),
  SIGN_IN_FAILURES_PER_ADDRESS: limit.default(defaultRateLimits.signInFailuresPerAddress),
  SIGN_IN_STARTS_PER_ADDRESS: limit.default(defaultRateLimits.signInStartsPerAddress),
  UPLOAD_LIMIT_WINDOW_MINUTES: limit.default(defaultRateLimits.uploadWindowMinutes),
  UPLOADS_PER_USER: limit.default(defaultRateLimits.uploadsPerUser),
});

export interface Config {
  port: number;
  host: string;
  publicUrl: string;
  databaseUrl: string;
  dataDir: string;
  oidc: {
    /** null → start the local provider on loopback */
    issuer: string | null;
    clientId: string;
    clientSecret: string | null;
    rolesClaim: string;
    shopsClaim: string;
    scopes: string;
    localPort: number;
  };
  smtp: { host: string | null; port: number | null; localPort: number; from: string };
  s3: {
    endpoint: string | null;
    region: string;
    bucket: string;
    accessKeyId: string | null;
    secretAccessKey: string | null;
    localPort: number;
  };
  loadDemo: boolean;
  /** precompute the group-wide pages' answers after every load (server/services/answer-warmer.ts) */
  warmAnswers: boolean;
  /** the largest export file an upload accepts, in bytes */
  maxUploadBytes: number;
  rateLimits: RateLimits;
}

/** Parses the environment once; every variable is documented in README.md. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const msg = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ");
    throw new Error(`Invalid environment: ${msg}`);
  }
  const e = parsed.data;
  return {
    port: e.PORT,
    host: e.HOST,
    publicUrl: (e.PUBLIC_URL ?? `http://127.0.0.1:${e.PORT}`).replace(/\/$/, ""),
    databaseUrl: e.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${e.PGPORT}/ironledger`,
    dataDir: e.DATA_DIR,
    oidc: {
      issuer: e.OIDC_ISSUER ?? null,
      clientId: e.OIDC_CLIENT_ID,
      clientSecret: e.OIDC_CLIENT_SECRET ?? null,
      rolesClaim: e.OIDC_ROLES_CLAIM,
      shopsClaim: e.OIDC_SHOPS_CLAIM,
      scopes: e.OIDC_SCOPES,
      localPort: e.LOCAL_OIDC_PORT,
    },
    smtp: { host: e.SMTP_HOST ?? null, port: e.SMTP_PORT ?? null, localPort: e.LOCAL_SMTP_PORT, from: e.MAIL_FROM },
    s3: {
      endpoint: e.S3_ENDPOINT ?? null,
      region: e.S3_REGION,
      bucket: e.S3_BUCKET,
      accessKeyId: e.S3_ACCESS_KEY_ID ?? null,
      secretAccessKey: e.S3_SECRET_ACCESS_KEY ?? null,
      localPort: e.LOCAL_S3_PORT,
    },
    loadDemo: e.LOAD_DEMO,
    warmAnswers: e.WARM_ANSWERS,
    maxUploadBytes: e.MAX_UPLOAD_MB * 1024 * 1024,
    rateLimits: {
      signInWindowMinutes: e.SIGN_IN_LIMIT_WINDOW_MINUTES,
      signInFailuresPerAccountAndAddress: e.SIGN_IN_FAILURES_PER_ACCOUNT_AND_ADDRESS,
      signInFailuresPerAccount: e.SIGN_IN_FAILURES_PER_ACCOUNT,
      signInFailuresPerAddress: e.SIGN_IN_FAILURES_PER_ADDRESS,
      signInStartsPerAddress: e.SIGN_IN_STARTS_PER_ADDRESS,
      uploadWindowMinutes: e.UPLOAD_LIMIT_WINDOW_MINUTES,
      uploadsPerUser: e.UPLOADS_PER_USER,
    },
  };
}

/** True when a URL's host is the loopback interface (plain http is allowed only there). */
export function isLoopbackUrl(url: string): boolean {
  const host = new URL(url).hostname;
  return host === "127.0.0.1" || host === "localhost" || host === "[::1]" || host === "::1";
}
