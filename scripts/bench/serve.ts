/**
 * The app alone, for benchmarks that measure it from outside: the API over BENCH_DB_URL on a loopback port,
 * signed sessions from BENCH_SESSION_SECRET, no static files, no fakes. Prints "listening <port>" when ready.
 * A process of its own so its memory (peak RSS) and event loop are not the load generator's.
 */
import type { AddressInfo } from "node:net";
import { createApp } from "../../server/app.js";
import { createOidcClient } from "../../server/auth/oidc-client.js";
import { createDb } from "../../server/db/database.js";

const url = process.env.BENCH_DB_URL;
const secret = process.env.BENCH_SESSION_SECRET;
if (!url || !secret) throw new Error("BENCH_DB_URL and BENCH_SESSION_SECRET are required");
const { db, pool } = createDb(url, 20);
const app = createApp({
  db, pool, publicUrl: "http://127.0.0.1:1", sessionSecret: secret,
  oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "bench", clientSecret: "bench" }),
  issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops",
});
const server = app.listen(0, "127.0.0.1", () => {
  process.stdout.write(`listening ${(server.address() as AddressInfo).port}\n`);
});
const stop = () => server.close(() => void db.destroy().then(() => process.exit(0)));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
