import { Router, type Request } from "express";
import * as client from "openid-client";
import { HttpError } from "../errors.js";
import { logger } from "../logger.js";
import type { OidcClient } from "./oidc-client.js";
import { userFromClaims } from "./claims.js";
import type { SessionUser } from "./session.js";
import { scopeFor } from "./require-user.js";
import { defaultRateLimits, type RateLimits } from "../config.js";
import { authRouteLimits } from "../http/rate-limits.js";

export interface AuthRouteOptions {
  oidc: OidcClient;
  publicUrl: string;
  scopes: string;
  rolesClaim: string;
  shopsClaim: string;
  onSignIn?: (user: SessionUser) => Promise<void>;
  /** a refusal in words for a user who may not sign in (deactivated), else null */
  admit?: (user: SessionUser) => Promise<string | null>;
  /** sign-ins started and failed callbacks allowed per address (defaults: config.ts) */
  rateLimits?: RateLimits;
}

/** Only same-origin relative paths may be a sign-in destination. */
export function safeReturnTo(v: unknown): string {
  if (typeof v !== "string" || !v.startsWith("/") || v.startsWith("//") || v.includes("\\")) return "/";
  return v;
}

const regenerate = (req: Request) => new Promise<void>((ok, fail) => req.session.regenerate((e) => (e ? fail(e) : ok())));
const save = (req: Request) => new Promise<void>((ok, fail) => req.session.save((e) => (e ? fail(e) : ok())));
const destroy = (req: Request) => new Promise<void>((ok, fail) => req.session.destroy((e) => (e ? fail(e) : ok())));

export function authRoutes(o: AuthRouteOptions): Router {
  const router = Router();
  const redirectUri = `${o.publicUrl}/auth/callback`;
  const limits = authRouteLimits(o.rateLimits ?? defaultRateLimits);

  router.get("/login", limits.start, async (req, res) => {
    const config = await o.oidc.config().catch((err: Error) => {
      logger.error({ err }, "identity provider discovery failed");
      throw new HttpError(503, "identity_provider_unavailable", "The sign-in service is not answering. Try again in a moment.");
    });
    const codeVerifier = client.randomPKCECodeVerifier();
    const codeChallenge = await client.calculatePKCECodeChallenge(codeVerifier);
    const state = client.randomState();
    const nonce = client.randomNonce();
    req.session.login = { state, nonce, codeVerifier, returnTo: safeReturnTo(req.query.returnTo) };
    await save(req);
    const url = client.buildAuthorizationUrl(config, {
      redirect_uri: redirectUri,
      scope: o.scopes,
      code_challenge: codeChallenge,
      code_challenge_method: "S256",
      state,
      nonce,
    });
    res.redirect(303, url.href);
  });

  router.get("/callback", limits.callback, async (req, res) => {
    const pending = req.session.login;
    if (!pending) throw new HttpError(400, "sign_in_expired", "This sign-in link has expired. Start again from the sign-in page.");
    const config = await o.oidc.config();
    let tokens: Awaited<ReturnType<typeof client.authorizationCodeGrant>>;
    try {
      tokens = await client.authorizationCodeGrant(config, new URL(req.originalUrl, o.publicUrl), {
        pkceCodeVerifier: pending.codeVerifier,
        expectedState: pending.state,
        expectedNonce: pending.nonce,
        idTokenExpected: true,
      });
    } catch (err) {
      logger.warn({ err }, "sign-in callback rejected");
      throw new HttpError(400, "sign_in_failed", "Sign-in could not be completed. Start again from the sign-in page.");
    }
    const claims = tokens.claims();
    if (!claims) throw new HttpError(400, "sign_in_failed", "The identity provider returned no identity.");
    const user = userFromClaims(claims as Record<string, unknown>, o.rolesClaim, o.shopsClaim);
    const refusal = await o.admit?.(user);
    if (refusal) {
      delete req.session.login;
      throw new HttpError(403, "account_deactivated", refusal);
    }
    await regenerate(req); // new session id at sign-in
    req.session.user = user;
    req.session.claims = user;
    req.session.idToken = tokens.id_token;
    await save(req);
    await o.onSignIn?.(user);
    res.redirect(303, pending.returnTo);
  });

  /** GET /auth/session: 200 with the signed-in user or null, so the client can check without a 401. */
  router.get("/session", (req, res) => {
    const u = req.session?.user;
    res.json({ user: u ? { sub: u.sub, name: u.name, email: u.email, roles: u.roles, scope: scopeFor(u) } : null });
  });

  router.post("/logout", async (req, res) => {
    const idToken = req.session?.idToken;
    if (req.session) await destroy(req);
    res.clearCookie("ironledger.sid");
    let target = `${o.publicUrl}/signed-out`;
    try {
      const config = await o.oidc.config();
      if (config.serverMetadata().end_session_endpoint) {
        target = client.buildEndSessionUrl(config, {
          post_logout_redirect_uri: `${o.publicUrl}/signed-out`,
          ...(idToken ? { id_token_hint: idToken } : {}),
        }).href;
      }
    } catch (err) {
      logger.warn({ err }, "identity provider unavailable at sign-out; app session ended only");
    }
    res.redirect(303, target);
  });

  return router;
}
