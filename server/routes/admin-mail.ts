import { Router } from "express";
import { allow } from "../auth/require-user.js";
import { HttpError } from "../errors.js";
import type { MailArchive } from "../services/mail-archive.js";
import type { CapturedMailList } from "../../shared/schemas/claims.js";

/**
 * Mail the local SMTP fake captured, for admins. Exists only while the fake is in use: with a real mail
 * server (no archive) every route answers 404 in words.
 */
export function adminMailRoutes(archive: MailArchive | null): Router {
  const router = Router();
  router.use(allow("admin"));
  router.use((_req, _res, next) => {
    if (!archive) return next(new HttpError(404, "no_mail_capture", "Captured mail exists only when the local SMTP fake is in use; this server sends through a real mail server."));
    next();
  });
  router.get("/", async (_req, res) => {
    const mail = (await archive!.list(200)).map((m) => ({ ...m, text: m.text.slice(0, 4000) }));
    res.json({ mail } satisfies CapturedMailList);
  });
  return router;
}
