/**
 * Mail the product sent, as a local capture keeps it. The SMTP fake provides one (server/stack.ts passes it to
 * the app); with a real mail server there is none.
 */
import type { CapturedMailList } from "../../shared/schemas/claims.js";

/** One captured message: the envelope, the subject, the text body and the attachments' names, types and sizes. */
export type CapturedMail = CapturedMailList["mail"][number];

export interface MailArchive {
  /** The newest messages first, at most `limit` of them. */
  list(limit: number): Promise<CapturedMail[]>;
}
