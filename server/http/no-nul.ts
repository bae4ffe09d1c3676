import type { NextFunction, Request, Response } from "express";
import { HttpError } from "../errors.js";

const hasNul = (v: unknown): boolean =>
  typeof v === "string" ? v.includes("\u0000") : Array.isArray(v) ? v.some(hasNul) : v !== null && typeof v === "object" ? Object.values(v).some(hasNul) : false;

/**
 * Refuses a request whose address or JSON body holds a NUL character: PostgreSQL text cannot hold one, so it
 * would otherwise end as a database error. A 400 in words instead, before any route.
 */
export function refuseNul(req: Request, _res: Response, next: NextFunction): void {
  if (/%00/i.test(req.originalUrl) || req.originalUrl.includes("\u0000") || hasNul(req.body)) {
    return next(new HttpError(400, "nul_character", "The request contains a NUL character (a zero byte), which no value in Ironledger can hold. Remove it and try again."));
  }
  next();
}
