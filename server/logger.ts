import pino from "pino";

/** Session cookies and credentials never reach the log (request and response headers as pino-http logs them). */
export const logRedaction = {
  paths: ["req.headers.cookie", "req.headers.authorization", 'res.headers["set-cookie"]'],
  censor: "[redacted]",
};

export const logger = pino({
  level: process.env.LOG_LEVEL ?? (process.env.NODE_ENV === "test" ? "silent" : "info"),
  base: undefined,
  redact: logRedaction,
});
export type Logger = typeof logger;
