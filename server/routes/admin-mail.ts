import { Router } from "express";
import { allow } from "../auth/require-user.js";
import { HttpError } from "../errors.js";
import { listCapturedMail } from "../dev/smtp-fake.js";
import { parseMail } from "../warranty/mime.js";
import type { CapturedMailList } from "../../shared/schemas/claims.js";

/**
 * Mail the local SMTP fake captured, for admins. Exists only while the fake is in use: with a real mail
 * server (mailDir null) every route answers 404 in words.
 */
export function adminMailRoutes(mailDir: string | null): Router {
  const router = Router();
  router.use(allow("admin"));
  router.use((_req, _res, next) => {
    if (!mailDir) return next(new HttpError(404, "no_mail_capture", "Captured mail exists only when the local SMTP fake is in use; this server sends through a real mail server."));
    next();
  });
  router.get("/", (_req, res) => {
    const mail = listCapturedMail(mailDir!).slice(0, 200).map((m) => {
      const p = parseMail(m.raw);
      return {
        id: m.id,
        from: m.from,
        to: m.to,
        subject: p.subject,
        receivedAt: m.receivedAt,
        text: p.text.slice(0, 4000),
        attachments: p.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, sizeBytes: a.content.length })),
      };
    });
    res.json({ mail } satisfies CapturedMailList);
  });
  return router;
}
