import { createHmac, randomBytes } from "node:crypto";
import type pg from "pg";
import type { SessionUser } from "./session.js";

/**
 * A signed session cookie for the server's own requests to itself (the answer warm-up): a row in the session
 * store, as a sign-in makes, for a user who exists only in this process's memory. The cookie never leaves
 * the process; the row expires like any session (`hours`).
 */
export async function serviceSessionCookie(pool: pg.Pool, secret: string, user: SessionUser, hours = 24): Promise<string> {
  const sid = randomBytes(24).toString("base64url");
  const expires = new Date(Date.now() + hours * 3600_000);
  const sess = { cookie: { originalMaxAge: hours * 3600_000, expires: expires.toISOString(), httpOnly: true, path: "/" }, user };
  await pool.query("INSERT INTO app_session (sid, sess, expire) VALUES ($1, $2, $3)", [sid, JSON.stringify(sess), expires]);
  // express-session's signed cookie: "s:" + id + "." + base64 HMAC-SHA256 of the id without padding
  const signature = createHmac("sha256", secret).update(sid).digest("base64").replace(/=+$/, "");
  return `ironledger.sid=${encodeURIComponent(`s:${sid}.${signature}`)}`;
}
