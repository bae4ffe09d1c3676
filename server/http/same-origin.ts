import type { NextFunction, Request, Response } from "express";
import { HttpError } from "../errors.js";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuses a state-changing request (any method but GET, HEAD, OPTIONS) that a browser says came from another
 * site: `Sec-Fetch-Site` other than same-origin (or none, a request the user made directly), or an `Origin`
 * other than Ironledger's own. SameSite=Lax cookies alone let sibling hosts and other ports through. Browsers
 * send one or both headers on every such request (Sec-Fetch-Site decides when present; Origin otherwise); a
 * request with neither is not from a browser page, so a
 * forged form cannot be one (OWASP Cross-Site Request Forgery Prevention Cheat Sheet, "Verifying Origin With
 * Standard Headers" and "Fetch Metadata headers"). Mounted before every route, so no route can be forgotten.
 */
export function sameOriginOnly(publicUrl: string) {
  const own = new URL(publicUrl).origin;
  return (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const site = req.get("sec-fetch-site");
    const origin = req.get("origin");
    // Fetch metadata first: a same-origin form under a no-referrer policy has Origin "null" but says same-origin
    const foreign = site !== undefined ? site !== "same-origin" && site !== "none" : origin !== undefined && origin !== own;
    if (foreign) {
      return next(
        new HttpError(403, "cross_site_request", "This request came from another site, so Ironledger did not act on it. Use Ironledger's own pages to make changes."),
      );
    }
    next();
  };
}
