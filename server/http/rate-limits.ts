import type { NextFunction, Request, RequestHandler, Response } from "express";
import { ipKeyGenerator, rateLimit, type Options } from "express-rate-limit";
import { HttpError } from "../errors.js";
import { logger } from "../logger.js";
import type { RateLimits } from "../config.js";

/**
 * Request limits, counted in this process (express-rate-limit's memory store: one server process holds
 * every count, and a restart forgets them). Sign-in counts only failures (skipSuccessfulRequests: an answer
 * under 400 takes its hit back), so people who type their password right are never slowed; uploads count
 * every attempt. A refused request gets 429 with Retry-After and a sentence that says when to try again.
 */

const minute = 60_000;

/** "in 14 minutes", "in a minute": the wait until the window that refused a request ends. */
export function waitInWords(resetTime: Date | undefined, windowMs: number, now = Date.now()): string {
  const ms = resetTime ? Math.max(0, resetTime.getTime() - now) : windowMs;
  const minutes = Math.max(1, Math.ceil(ms / minute));
  return minutes === 1 ? "in a minute" : `in ${minutes} minutes`;
}

const minutesInWords = (m: number) => (m === 1 ? "minute" : `${m} minutes`);

/** The client's address (an IPv6 address by its /56, as the library advises: one household or office holds many). */
const address = (req: Request) => ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? "unknown");

/** The account name a sign-in form names, as the provider looks it up; "" when none. */
export const accountName = (req: Request): string =>
  String((req.body as { username?: unknown } | undefined)?.username ?? "")
    .trim()
    .toLowerCase()
    .slice(0, 128);

/** Answers a refused request: the form again with the message, or `next` with an error for the envelope. */
export type Refuse = (req: Request, res: Response, next: NextFunction, message: string) => void;

interface LimitSpec {
  what: string;
  windowMs: number;
  limit: number;
  key: (req: Request) => string;
  skip?: (req: Request) => boolean;
  failuresOnly: boolean;
  message: (wait: string) => string;
  refuse: Refuse;
}

function limiter(s: LimitSpec): RequestHandler {
  const options: Partial<Options> = {
    windowMs: s.windowMs,
    limit: s.limit,
    standardHeaders: "draft-7",
    legacyHeaders: false,
    skipSuccessfulRequests: s.failuresOnly,
    keyGenerator: (req) => s.key(req),
    ...(s.skip ? { skip: (req: Request) => s.skip!(req) } : {}),
    logger: { error: (err, msg) => logger.error({ err }, msg), warn: (err, msg) => logger.warn({ err }, msg) },
    handler: (req, res, next) => {
      const info = (req as Request & { rateLimit?: { used: number; limit: number; resetTime?: Date } }).rateLimit;
      if (info && info.used === info.limit + 1) logger.warn({ limit: s.what, address: req.ip }, "request limit reached");
      s.refuse(req, res, next, s.message(waitInWords(info?.resetTime, s.windowMs)));
    },
  };
  return rateLimit(options);
}

/** Refusal in the JSON error envelope (the error handler writes it). */
const envelope =
  (code: string): Refuse =>
  (_req, _res, next, message) =>
    next(new HttpError(429, code, message));

/**
 * The sign-in form's limits, in the order they are checked: failures from one address (any account name),
 * failures for one account name from one address, failures for one account name from every address. The
 * form's body must be parsed before them. `refuse` answers a refused attempt (the form again, with the message).
 */
export function signInFormLimits(l: RateLimits, refuse: Refuse): RequestHandler[] {
  const windowMs = l.signInWindowMinutes * minute;
  const window = minutesInWords(l.signInWindowMinutes);
  const unnamed = (req: Request) => accountName(req) === "";
  return [
    limiter({
      what: "sign-in failures per address",
      windowMs,
      limit: l.signInFailuresPerAddress,
      key: address,
      failuresOnly: true,
      message: (wait) => `Too many failed sign-ins from your network address (${l.signInFailuresPerAddress} in ${window}). Try again ${wait}.`,
      refuse,
    }),
    limiter({
      what: "sign-in failures per account and address",
      windowMs,
      limit: l.signInFailuresPerAccountAndAddress,
      key: (req) => `${address(req)} ${accountName(req)}`,
      skip: unnamed,
      failuresOnly: true,
      message: (wait) =>
        `Too many failed sign-ins for this username from your network address (${l.signInFailuresPerAccountAndAddress} in ${window}). Try again ${wait}; if you have forgotten the password, ask your administrator.`,
      refuse,
    }),
    limiter({
      what: "sign-in failures per account",
      windowMs,
      limit: l.signInFailuresPerAccount,
      key: accountName,
      skip: unnamed,
      failuresOnly: true,
      message: (wait) => `Too many failed sign-ins for this username (${l.signInFailuresPerAccount} in ${window}, from any address). Try again ${wait}.`,
      refuse,
    }),
  ];
}

/** The relying party's /auth routes: sign-ins started per address, and failed callbacks per address. */
export function authRouteLimits(l: RateLimits): { start: RequestHandler; callback: RequestHandler } {
  const windowMs = l.signInWindowMinutes * minute;
  const window = minutesInWords(l.signInWindowMinutes);
  return {
    start: limiter({
      what: "sign-ins started per address",
      windowMs,
      limit: l.signInStartsPerAddress,
      key: address,
      failuresOnly: false,
      message: (wait) => `Too many sign-ins started from your network address (${l.signInStartsPerAddress} in ${window}). Try again ${wait}.`,
      refuse: envelope("too_many_sign_in_attempts"),
    }),
    callback: limiter({
      what: "failed sign-in callbacks per address",
      windowMs,
      limit: l.signInFailuresPerAddress,
      key: address,
      failuresOnly: true,
      message: (wait) => `Too many sign-ins that could not be completed from your network address (${l.signInFailuresPerAddress} in ${window}). Try again ${wait}.`,
      refuse: envelope("too_many_sign_in_attempts"),
    }),
  };
}

/** Claim attachment uploads per signed-in user (a request without a session is left to the route's 401). */
export function uploadLimit(l: RateLimits): RequestHandler {
  const window = minutesInWords(l.uploadWindowMinutes);
  return limiter({
    what: "uploads per user",
    windowMs: l.uploadWindowMinutes * minute,
    limit: l.uploadsPerUser,
    key: (req) => `user ${req.session?.user?.sub ?? ""}`,
    skip: (req) => !req.session?.user,
    failuresOnly: false,
    message: (wait) =>
      `You have uploaded ${l.uploadsPerUser} files in the last ${window}, the most Ironledger accepts from one person in that time. Nothing was saved from this one; try again ${wait}.`,
    refuse: envelope("too_many_uploads"),
  });
}
