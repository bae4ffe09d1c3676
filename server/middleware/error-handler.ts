import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import { randomUUID } from "node:crypto";
import { HttpError } from "../errors.js";
import { logger } from "../logger.js";
import type { ErrorEnvelope } from "../../shared/schemas/error.js";

export const requestId: RequestHandler = (req, res, next) => {
  const id = (req.headers["x-request-id"] as string | undefined)?.slice(0, 64) || randomUUID();
  res.locals.requestId = id;
  res.setHeader("x-request-id", id);
  next();
};

/** Plain-words summary of a zod failure: "from: Invalid ISO date; shops: …". */
function describeZod(err: ZodError): string {
  return err.issues.map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message)).join("; ");
}

/** One handler maps every error to the JSON envelope; internals never leak. */
export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  const rid = res.locals.requestId as string | undefined;
  let status = 500;
  let body: ErrorEnvelope;
  if (err instanceof HttpError) {
    status = err.status;
    body = { error: { code: err.code, message: err.message, requestId: rid, details: err.details } };
  } else if (err instanceof ZodError) {
    status = 400;
    body = { error: { code: "validation_failed", message: `The request is not valid: ${describeZod(err)}`, requestId: rid, details: err.issues } };
  } else if (err?.type === "entity.parse.failed") {
    status = 400;
    body = { error: { code: "invalid_json", message: "The request body is not valid JSON.", requestId: rid } };
  } else if (err?.type === "entity.too.large" || err?.code === "LIMIT_FILE_SIZE") {
    status = 413;
    body = { error: { code: "too_large", message: "The upload is larger than Ironledger accepts.", requestId: rid } };
  } else {
    logger.error({ err, requestId: rid }, "unhandled error");
    body = { error: { code: "internal", message: "Something went wrong on the server. Quote this request id when reporting it.", requestId: rid } };
  }
  if (res.headersSent) return;
  res.status(status).json(body);
};

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({
    error: { code: "not_found", message: `There is no API route ${req.method} ${req.originalUrl}.`, requestId: res.locals.requestId },
  } satisfies ErrorEnvelope);
};
