import { Router } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { digestPreference, lastDigestSent, saveDigestPreference } from "../db/queries/digest.js";
import { HttpError } from "../errors.js";
import { allRoles } from "../../shared/roles.js";
import { digestPreferenceSchema, type DigestPage } from "../../shared/schemas/digest.js";
import { todayIso } from "../../shared/dates.js";
import { buildDigest, sinceFor } from "../services/digest/digest.js";
import { benchmarkService } from "../services/benchmarks/service.js";

/**
 * The signed-in user's own weekly digest: GET gives their choice (on or off, the weekday), the address it goes
 * to and this week's digest as it reads now, built for their roles and shops exactly as the mail is; PUT
 * changes the choice. Every role has one; a user changes only their own.
 */
export function digestRoutes(db: Db): Router {
  const router = Router();
  const benchmarks = benchmarkService(db);
  router.use(allow(...allRoles));

  const page = async (sub: string, reader: Parameters<typeof buildDigest>[1], email: string | null): Promise<DigestPage> => {
    const today = todayIso();
    const last = await lastDigestSent(db, sub);
    return {
      preference: await digestPreference(db, sub),
      email,
      lastSent: last ? { week: last.week, at: last.sent_at.toISOString() } : null,
      preview: await buildDigest({ db, benchmarks }, reader, today, sinceFor(today, last?.sent_at ?? null), ""),
    };
  };
  const readerOfRequest = (req: Parameters<typeof requireUser>[0]) => {
    const u = requireUser(req);
    return { u, reader: { sub: u.sub, name: u.name, roles: u.roles, scope: requireScope(req) } };
  };

  router.get("/", async (req, res) => {
    const { u, reader } = readerOfRequest(req);
    res.json(await page(u.sub, reader, u.email));
  });

  router.put("/", async (req, res) => {
    const { u, reader } = readerOfRequest(req);
    const parsed = digestPreferenceSchema.safeParse(req.body ?? {});
    if (!parsed.success) throw new HttpError(400, "validation_failed", `Nothing was changed: ${parsed.error.issues.map((i) => i.message).join("; ")}.`, parsed.error.issues);
    if (!(await saveDigestPreference(db, u.sub, parsed.data)))
      throw new HttpError(409, "user_unknown", "Your account is not stored yet: sign out and in again, then choose your digest.");
    res.json(await page(u.sub, reader, u.email));
  });

  return router;
}
