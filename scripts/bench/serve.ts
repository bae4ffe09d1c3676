/**
 * The app alone, for benchmarks that measure it from outside: the API over BENCH_DB_URL on a loopback port,
 * signed sessions from BENCH_SESSION_SECRET, no static files, no fakes; answers warmed after loads as in the product. Prints "listening <port>" when ready.
 * A process of its own so its memory (peak RSS) and event loop are not the load generator's.
 */
import type { AddressInfo } from "node:net";
import { createApp } from "../../server/app.js";
import { createOidcClient } from "../../server/auth/oidc-client.js";
import { createDb } from "../../server/db/database.js";
import { serviceSessionCookie } from "../../server/auth/service-session.js";
import { startAnswerWarmer, type AnswerWarmer } from "../../server/services/answer-warmer.js";

const url = process.env.BENCH_DB_URL;
const secret = process.env.BENCH_SESSION_SECRET;
if (!url || !secret) throw new Error("BENCH_DB_URL and BENCH_SESSION_SECRET are required");
const { db, pool } = createDb(url, 20);
const app = createApp({
  db, pool, publicUrl: "http://127.0.0.1:1", sessionSecret: secret,
  oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "bench", clientSecret: "bench" }),
  issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops",
});
// as the product runs: the group-wide answers are computed after every load (server/services/answer-warmer.ts)
let warmer: AnswerWarmer | null = null;
const server = app.listen(0, "127.0.0.1", () => {
  const { port } = server.address() as AddressInfo;
  const user = { sub: "bench-warm-up", name: "Answer warm-up", email: null, roles: ["analyst" as const], shops: [] };
  warmer = startAnswerWarmer({ db, origin: `http://127.0.0.1:${port}`, cookie: () => serviceSessionCookie(pool, secret, user) });
  process.stdout.write(`listening ${port}\n`);
});
const stop = () => {
  warmer?.stop();
  server.close(() => void db.destroy().then(() => process.exit(0)));
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
