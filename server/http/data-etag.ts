import { createHash } from "node:crypto";
import type { NextFunction, Request, Response } from "express";
import onHeaders from "on-headers";
import type { Db } from "../db/database.js";
import { dataVersion } from "../db/queries/data-version.js";

/** Changes with every start of the server, so a new release never answers 304 for an old computation. */
const BOOT = `${process.pid}-${Date.now()}`;

/**
 * Conditional GETs for answers that depend only on the warehouse's data: the ETag is a hash of the data
 * version (last batch, last derived-table refresh), the server's boot, the URL and the signed-in user's
 * roles and shops. A request whose If-None-Match still matches gets a 304 before anything is computed.
 * Only 200 answers carry the tag, marked `private, no-cache` (a browser may keep them, and asks again).
 * For routes whose answers also change with the clock or with other tables (claims, overview visits,
 * benchmarks' claim counts), do not mount it.
 */
export function dataEtag(db: Db) {
  return async (req: Request, res: Response, next: NextFunction) => {
    const user = req.session?.user;
    if ((req.method !== "GET" && req.method !== "HEAD") || !user) return next();
    try {
      const version = await dataVersion(db);
      const tag = `W/"${createHash("sha256")
        .update(JSON.stringify([version, BOOT, req.originalUrl, [...user.roles].sort(), [...user.shops].sort()]))
        .digest("base64url")
        .slice(0, 27)}"`;
      const asked = req.headers["if-none-match"];
      if (asked && asked.split(",").some((t) => t.trim() === tag)) {
        res.setHeader("ETag", tag);
        res.setHeader("Cache-Control", "private, no-cache");
        res.status(304).end();
        return;
      }
      res.setHeader("ETag", tag); // set before the body, so Express does not hash the body for its own tag
      onHeaders(res, function (this: Response) {
        if (this.statusCode === 200) this.setHeader("Cache-Control", "private, no-cache");
        else this.removeHeader("ETag");
      });
      next();
    } catch (err) {
      next(err);
    }
  };
}
