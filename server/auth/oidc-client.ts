import * as client from "openid-client";
import { isLoopbackUrl } from "../config.js";

export interface OidcSettings {
  issuer: string;
  clientId: string;
  clientSecret: string;
}

/**
 * Discovers the issuer once and caches the configuration. Plain-http requests to the issuer are allowed
 * only when it is on loopback (the local provider); a remote issuer must use https.
 */
export function createOidcClient(s: OidcSettings) {
  let cached: Promise<client.Configuration> | null = null;
  const discover = async (): Promise<client.Configuration> => {
    const url = new URL(s.issuer);
    if (url.protocol !== "https:" && !isLoopbackUrl(s.issuer)) {
      throw new Error(`OIDC issuer ${s.issuer} must use https (plain http is allowed only on loopback)`);
    }
    const options = url.protocol === "http:" ? { execute: [client.allowInsecureRequests] } : undefined;
    return await client.discovery(url, s.clientId, s.clientSecret, undefined, options);
  };
  return {
    async config(): Promise<client.Configuration> {
      if (!cached) {
        cached = discover();
        cached.catch(() => {
          cached = null; // retry on the next request when the issuer was not up yet
        });
      }
      return await cached;
    },
  };
}
export type OidcClient = ReturnType<typeof createOidcClient>;
