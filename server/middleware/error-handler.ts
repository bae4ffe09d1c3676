import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import { randomUUID } from "node:crypto";
import { databaseUnavailable, DEPENDENCY_CODES, HttpError, isDatabaseUnreachable, RETRY_AFTER_SECONDS } from "../errors.js";
import { logger } from "../logger.js";
import type { ErrorEnvelope } from "../../shared/schemas/error.js";
import { installZodWords, issueInWords } from "../../shared/zod-words.js";

installZodWords();

export const requestId: RequestHandler = (req, res, next) => {
  const id = (req.headers["x-request-id"] as string | undefined)?.slice(0, 64) || randomUUID();
  res.locals.requestId = id;
  res.setHeader("x-request-id", id);
  next();
};

/** The query and body fields many routes share, named as the pages name them. */
const FIELD_LABELS: Record<string, string> = { q: "The search", from: "From", to: "To", page: "The page", pageSize: "Rows per page", sort: "The sort", dir: "The sort direction" };

/** Plain-words summary of a zod failure: "The search is at most 100 characters long; to: The From date is after the To date". */
function describeZod(err: ZodError): string {
  return err.issues.map((i) => issueInWords(i.path, i.message, FIELD_LABELS)).join("; ");
}

const kb = (bytes: number) => (bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(0)} MB` : `${Math.ceil(bytes / 1024)} kB`);

/** The multipart reader's (multer) limits, in words. */
const multipartLimits: Record<string, [number, string, string]> = {
  LIMIT_FILE_SIZE: [413, "too_large", "The file is larger than Ironledger accepts. Nothing was saved."],
  LIMIT_FILE_COUNT: [400, "too_many_files", "The form holds more files than this request accepts (one). Nothing was saved."],
  LIMIT_UNEXPECTED_FILE: [400, "unexpected_file", "The form holds a file in a field this request does not read. Nothing was saved."],
  LIMIT_FIELD_COUNT: [400, "too_many_fields", "The form holds more fields than this request accepts. Nothing was saved."],
  LIMIT_PART_COUNT: [400, "too_many_parts", "The form holds more parts (fields and files) than this request accepts. Nothing was saved."],
  LIMIT_FIELD_KEY: [400, "field_name_too_long", "A field name in the form is longer than this request accepts. Nothing was saved."],
  LIMIT_FIELD_VALUE: [413, "field_too_large", "A field value in the form is larger than this request accepts. Nothing was saved."],
  LIMIT_FIELD_NESTING: [400, "field_name_too_deep", "A field name in the form nests deeper than this request accepts. Nothing was saved."],
  LIMIT_FIELD_ARRAY_INDEX: [400, "field_name_too_deep", "A field name in the form holds an index larger than this request accepts. Nothing was saved."],
  MISSING_FIELD_NAME: [400, "malformed_form", "A part of the form has no field name. Nothing was saved."],
  INVALID_FIELD_NAME: [400, "malformed_form", "A field name in the form is not valid. Nothing was saved."],
};

/** busboy's words for a multipart body it cannot read (node_modules/busboy/lib). */
const malformedMultipart = /^(Multipart: Boundary not found|Malformed part header|Malformed content type|Unexpected end of (form|file))$/;

/**
 * A request body the server will not read, in words: body-parser's errors (by their `type`, express.json and
 * express.urlencoded) and the multipart reader's. Null for any other error.
 */
export function bodyErrorInWords(err: unknown): { status: number; code: string; message: string } | null {
  const e = err as { type?: unknown; code?: unknown; name?: unknown; message?: unknown; limit?: unknown; charset?: unknown; encoding?: unknown } | null;
  if (!e || typeof e !== "object") return null;
  switch (e.type) {
    case "entity.parse.failed":
      return { status: 400, code: "invalid_json", message: "The request body is not valid JSON." };
    case "entity.too.large":
      return {
        status: 413,
        code: "too_large",
        message: `The request body is larger than ${typeof e.limit === "number" ? kb(e.limit) : "Ironledger accepts"}, the most this request may send.`,
      };
    case "charset.unsupported":
      return {
        status: 415,
        code: "unsupported_charset",
        message: `The request body's character set${typeof e.charset === "string" ? ` (${e.charset.slice(0, 40)})` : ""} is not one Ironledger reads. Send it as UTF-8.`,
      };
    case "encoding.unsupported":
      return {
        status: 415,
        code: "unsupported_encoding",
        message: `The request body's content encoding${typeof e.encoding === "string" ? ` (${e.encoding.slice(0, 40)})` : ""} is not one Ironledger reads. Send it uncompressed, or as gzip, deflate or br.`,
      };
    case "request.aborted":
      return { status: 400, code: "request_aborted", message: "The request body ended before it was complete." };
    case "request.size.invalid":
      return { status: 400, code: "body_length_mismatch", message: "The request body's length does not match its Content-Length." };
    case "parameters.too.many":
      return { status: 413, code: "too_many_fields", message: "The form holds more fields than Ironledger accepts." };
  }
  if (e.name === "MulterError" && typeof e.code === "string" && multipartLimits[e.code]) {
    const [status, code, message] = multipartLimits[e.code];
    return { status, code, message };
  }
  if (typeof e.message === "string" && malformedMultipart.test(e.message)) {
    return { status: 400, code: "malformed_form", message: "The form (multipart body) could not be read: it is cut short or its parts are malformed. Nothing was saved." };
  }
  // a decompression stream fed bytes that are not what its Content-Encoding says (zlib's codes)
  if (typeof e.code === "string" && /^Z_(DATA|BUF)_ERROR$/.test(e.code)) {
    return { status: 400, code: "invalid_encoding", message: "The request body could not be decompressed as its Content-Encoding says." };
  }
  return null;
}

/** One handler maps every error to the JSON envelope; internals never leak. */
export const errorHandler: ErrorRequestHandler = (raw, _req, res, _next) => {
  let err = raw;
  const rid = res.locals.requestId as string | undefined;
  let status = 500;
  let body: ErrorEnvelope;
  if (!(err instanceof HttpError) && isDatabaseUnreachable(err)) {
    // the driver's own words (addresses, SQLSTATEs) stay in the log
    logger.warn({ err: { code: (err as { code?: unknown }).code, message: (err as Error).message }, requestId: rid }, "database unreachable");
    err = databaseUnavailable();
  }
  if (err instanceof HttpError) {
    if (DEPENDENCY_CODES.has(err.code) && !res.headersSent) res.setHeader("Retry-After", String(RETRY_AFTER_SECONDS));
    status = err.status;
    body = { error: { code: err.code, message: err.message, requestId: rid, details: err.details } };
  } else if (err instanceof ZodError) {
    status = 400;
    body = { error: { code: "validation_failed", message: `The request is not valid: ${describeZod(err)}`, requestId: rid, details: err.issues } };
  } else if (bodyErrorInWords(err)) {
    const b = bodyErrorInWords(err)!;
    status = b.status;
    body = { error: { code: b.code, message: b.message, requestId: rid } };
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
