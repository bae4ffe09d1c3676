/** The one error class routes throw; the error handler turns it into the JSON envelope. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "HttpError";
  }
}

export const unauthorized = () => new HttpError(401, "unauthorized", "Sign in to use Ironledger.");
export const forbidden = (what = "this") =>
  new HttpError(403, "forbidden", `Your role does not allow access to ${what}.`);
export const notFound = (what: string) => new HttpError(404, "not_found", `${what} was not found.`);

/** Seconds a client is asked to wait (Retry-After) when a dependency is down. */
export const RETRY_AFTER_SECONDS = 30;

// One 503 per dependency, so the answer names what is down. `consequence` says what could not be done.
export const databaseUnavailable = () =>
  new HttpError(503, "database_unavailable", "The warehouse database is not answering; try again in a minute.");
export const storageUnavailable = (consequence = "") =>
  new HttpError(503, "storage_unavailable", `Object storage (where claim attachments are kept) is not answering${consequence}; try again in a minute.`);
export const mailUnavailable = (message: string) => new HttpError(503, "mail_unavailable", message);

/** The codes of the per-dependency 503s above. */
export const DEPENDENCY_CODES: ReadonlySet<string> = new Set(["database_unavailable", "storage_unavailable", "mail_unavailable"]);

/** Socket-level failures: the peer refused, reset, went away or never answered. */
const SOCKET_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "ENOTFOUND", "EAI_AGAIN", "EHOSTUNREACH", "ENETUNREACH"]);

/** PostgreSQL SQLSTATEs of a server that is going away, starting up or out of connections. */
const PG_DOWN_STATES = new Set(["57P01", "57P02", "57P03", "53300", "08000", "08001", "08003", "08004", "08006"]);

/** Messages node-postgres and pg-pool give when the server or the pool cannot serve a query. */
const PG_DOWN_MESSAGES = [
  /^Connection terminated/,
  /timeout exceeded when trying to connect/,
  /is not queryable/,
  /^Client was closed/,
  /^Cannot use a pool after calling end/,
];

/**
 * True when `err` says PostgreSQL could not be reached (refused, terminated, shutting down, pool timeout),
 * not that a query was wrong. Object storage and mail translate their own failures where they happen
 * (server/services/storage.ts, warranty/send.ts), so a bare socket error that reaches the handler is the
 * database's.
 */
export function isDatabaseUnreachable(err: unknown): boolean {
  if (!err || typeof err !== "object") return false;
  const e = err as { code?: unknown; message?: unknown; errors?: unknown; type?: unknown };
  // the request body's reader (body-parser, raw-body) types its errors, a client's aborted upload among them
  if (typeof e.type === "string") return false;
  if (typeof e.code === "string" && (SOCKET_CODES.has(e.code) || PG_DOWN_STATES.has(e.code))) return true;
  if (typeof e.message === "string" && PG_DOWN_MESSAGES.some((re) => re.test(e.message as string))) return true;
  // net's AggregateError when every address of the host refused
  return Array.isArray(e.errors) && e.errors.length > 0 && e.errors.every(isDatabaseUnreachable);
}
