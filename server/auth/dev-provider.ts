import express from "express";
import type { Server } from "node:http";
import Provider, { type Configuration } from "oidc-provider";
import type { JsonWebKey } from "node:crypto";
import { findDemoAccount } from "./demo-accounts.js";
import { errorPage, loginPage, logoutPage, signedOutPage } from "./provider-pages.js";
import { defaultRateLimits, type RateLimits } from "../config.js";
import { signInFormLimits } from "../http/rate-limits.js";
import { bodyErrorInWords } from "../middleware/error-handler.js";
import { logger } from "../logger.js";

export interface DevProviderOptions {
  issuer: string; // e.g. http://127.0.0.1:8081
  clientId: string;
  clientSecret: string;
  redirectUris: string[];
  postLogoutRedirectUris: string[];
  signingKey: JsonWebKey;
  cookieKeys: string[];
  /** failed sign-ins allowed before the form answers 429 (defaults: config.ts) */
  rateLimits?: RateLimits;
}

/**
 * The local OpenID Connect provider (oidc-provider) with Ironledger's own sign-in page and the demo accounts.
 * Any standards-compliant issuer replaces it through OIDC_ISSUER; nothing else in the app depends on it.
 */
export function createDevProvider(o: DevProviderOptions): express.Express {
  const configuration: Configuration = {
    clients: [
      {
        client_id: o.clientId,
        client_secret: o.clientSecret,
        redirect_uris: o.redirectUris,
        post_logout_redirect_uris: o.postLogoutRedirectUris,
        grant_types: ["authorization_code"],
        response_types: ["code"],
        token_endpoint_auth_method: "client_secret_basic",
      },
    ],
    jwks: { keys: [o.signingKey as never] },
    cookies: { keys: o.cookieKeys },
    pkce: { required: () => true },
    scopes: ["openid", "profile", "email", "ironledger"],
    claims: { openid: ["sub"], profile: ["name"], email: ["email"], ironledger: ["roles", "shops"] },
    conformIdTokenClaims: false,
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: async (ctx, form) => {
          ctx.body = logoutPage(form.replace("</form>", '<input type="hidden" name="logout" value="yes"></form>'));
        },
        postLogoutSuccessSource: async (ctx) => {
          ctx.body = signedOutPage();
        },
      },
    },
    ttl: {
      AccessToken: 3600,
      AuthorizationCode: 60,
      IdToken: 3600,
      Interaction: 3600,
      Session: 14 * 24 * 3600,
      Grant: 14 * 24 * 3600,
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    findAccount: async (_ctx, sub) => {
      const account = findDemoAccount(sub);
      if (!account) return undefined;
      return {
        accountId: sub,
        claims: async () => ({
          sub,
          name: account.name,
          email: account.email,
          roles: account.roles,
          shops: account.shops,
        }),
      };
    },
  };
  const provider = new Provider(o.issuer, configuration);
  provider.proxy = false;

  const app = express();
  app.disable("x-powered-by");
  const form = express.urlencoded({ extended: false, limit: "16kb", parameterLimit: 20 });
  // failed attempts only (a 401 from the handler below); a refused one gets the form again with a 429
  const attemptLimits = signInFormLimits(o.rateLimits ?? defaultRateLimits, (req, res, _next, message) => {
    res.status(429).type("html").send(loginPage(String(req.params.uid), message, String(req.body?.username ?? "")));
  });

  app.get("/interaction/:uid", async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      if (details.prompt.name === "login") {
        res.type("html").send(loginPage(details.uid));
        return;
      }
      // First-party client: consent is granted without a prompt.
      const accountId = details.session?.accountId;
      if (!accountId) throw new Error("interaction has no account");
      const grant = details.grantId
        ? await provider.Grant.find(details.grantId)
        : new provider.Grant({ accountId, clientId: String(details.params.client_id) });
      if (!grant) throw new Error("grant not found");
      const missing = details.prompt.details as { missingOIDCScope?: string[]; missingOIDCClaims?: string[] };
      if (missing.missingOIDCScope) grant.addOIDCScope(missing.missingOIDCScope.join(" "));
      if (missing.missingOIDCClaims) grant.addOIDCClaims(missing.missingOIDCClaims);
      const grantId = await grant.save();
      await provider.interactionFinished(req, res, { consent: { grantId } }, { mergeWithLastSubmission: true });
    } catch (err) {
      next(err);
    }
  });

  app.post("/interaction/:uid/login", form, ...attemptLimits, async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      const username = String(req.body?.username ?? "");
      const password = String(req.body?.password ?? "");
      const account = findDemoAccount(username);
      if (!account || account.password !== password) {
        res.status(401).type("html").send(loginPage(details.uid, "That username and password do not match a demo account.", username));
        return;
      }
      await provider.interactionFinished(
        req,
        res,
        { login: { accountId: account.username } },
        { mergeWithLastSubmission: false },
      );
    } catch (err) {
      next(err);
    }
  });

  // the form's own errors as a page in words (express's default page would show a stack trace in development)
  app.use((err: unknown, _req: express.Request, res: express.Response, _next: express.NextFunction) => {
    const body = bodyErrorInWords(err);
    const status = (err as { status?: number }).status;
    if (body) res.status(body.status).type("html").send(errorPage(`${body.message} Start again from Ironledger's sign-in page.`));
    else if (typeof status === "number" && status >= 400 && status < 500)
      res.status(status).type("html").send(errorPage("This sign-in page has expired or was already used. Start again from Ironledger's sign-in page."));
    else {
      logger.error({ err }, "local sign-in form failed");
      res.status(500).type("html").send(errorPage("The sign-in service failed. Try again in a moment."));
    }
  });

  app.use(provider.callback());
  return app;
}

export async function listen(app: express.Express, port: number, host = "127.0.0.1"): Promise<Server> {
  return await new Promise((resolve, reject) => {
    const server = app.listen(port, host, (err?: Error) => (err ? reject(err) : resolve(server)));
    server.on("error", reject);
  });
}
