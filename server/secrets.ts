import { generateKeyPairSync, randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import type { JsonWebKey as JWK } from "node:crypto";

export interface DevSecrets {
  sessionSecret: string;
  providerCookieKeys: string[];
  clientSecret: string;
  signingKey: JWK;
  s3AccessKeyId: string;
  s3SecretAccessKey: string;
}

function generate(): DevSecrets {
  const { privateKey } = generateKeyPairSync("rsa", { modulusLength: 2048 });
  const jwk = privateKey.export({ format: "jwk" }) as JWK;
  return {
    sessionSecret: randomBytes(32).toString("base64url"),
    providerCookieKeys: [randomBytes(32).toString("base64url")],
    clientSecret: randomBytes(24).toString("base64url"),
    signingKey: { ...jwk, kid: randomBytes(8).toString("hex"), alg: "RS256", use: "sig" },
    s3AccessKeyId: "S3RVER",
    s3SecretAccessKey: "S3RVER",
  };
}

/** Development secrets live in <dataDir>/secrets.json, generated on first start and never committed. */
export function loadOrCreateSecrets(dataDir: string): DevSecrets {
  const file = path.join(dataDir, "secrets.json");
  if (existsSync(file)) return JSON.parse(readFileSync(file, "utf8")) as DevSecrets;
  mkdirSync(dataDir, { recursive: true });
  const secrets = generate();
  writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return secrets;
}
