import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { Writable } from "node:stream";
import pino from "pino";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { logRedaction } from "../../server/logger.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// Cross-site request forgery: a state-changing request is refused when the browser says it came from another
// site, by Origin or by Sec-Fetch-Site (OWASP Cross-Site Request Forgery Prevention Cheat Sheet; Fetch
// Metadata: W3C "Fetch Metadata Request Headers"). The routes are read from the source, so a new one is tried
// here without anyone adding it.

const root = path.resolve(import.meta.dirname, "../..");
const OWN = "http://127.0.0.1:8080"; // the test app's public URL (tests/helpers/test-app.ts)

/** Where each router file is mounted (server/app.ts, server/routes/index.ts). */
const MOUNTS: Record<string, string> = {
  "server/auth/routes.ts": "/auth",
  "server/routes/admin-shops.ts": "/api/admin/shops",
  "server/routes/admin-profiles.ts": "/api/admin/profiles",
  "server/routes/admin-warranty-policies.ts": "/api/admin/warranty-policies",
  "server/routes/admin-users.ts": "/api/admin/users",
  "server/routes/admin-settings.ts": "/api/admin/settings",
  "server/routes/claims.ts": "/api/claims",
  "server/routes/claim-lifecycle.ts": "/api/claims",
  "server/routes/claim-story.ts": "/api/claims",
  "server/routes/imports.ts": "/api/imports",
  "server/routes/findings.ts": "/api/findings",
  "server/routes/bench-sheet.ts": "/api/bench-sheet",
  "server/routes/winter.ts": "/api/winter",
  "server/routes/digest.ts": "/api/digest",
  "server/routes/admin-engine-specs.ts": "/api/admin/engine-specs",
};

function stateChangingRoutes(): { file: string; method: string; path: string }[] {
  const files = ["server/auth", "server/routes"].flatMap((d) => readdirSync(path.join(root, d)).filter((f) => f.endsWith(".ts")).map((f) => `${d}/${f}`));
  return files.flatMap((file) =>
    [...readFileSync(path.join(root, file), "utf8").matchAll(/router\.(post|put|patch|delete)\(\s*"([^"]+)"/g)].map((m) => ({ file, method: m[1], path: m[2] })),
  );
}

let t: TestApp;
let clerk: string;
beforeAll(async () => {
  t = await testApp();
  clerk = await t.signInAs({ roles: ["clerk"] });
}, 120_000);
afterAll(async () => t?.drop());

const send = (method: string, url: string, headers: Record<string, string>) =>
  request(t.app)[method as "post"](url).set("Cookie", clerk).set(headers).send({});

describe("state-changing routes", () => {
  const routes = stateChangingRoutes();

  it("are all found in the source, and each file's mount is known", () => {
    expect(routes.length).toBeGreaterThanOrEqual(5);
    for (const r of routes) expect(MOUNTS[r.file], `mount of ${r.file}`).toBeDefined();
  });

  for (const [name, headers] of [
    ["another site's form (Origin)", { Origin: "https://elsewhere.example" }],
    ["a sibling port (Origin)", { Origin: "http://127.0.0.1:8081" }],
    ["a sibling host (Sec-Fetch-Site: same-site)", { "Sec-Fetch-Site": "same-site" }],
    ["another site (Sec-Fetch-Site: cross-site)", { "Sec-Fetch-Site": "cross-site", Origin: "null" }],
  ] as const) {
    it(`refuse ${name} with 403 in words, and change nothing`, async () => {
      const before = await t.db.selectFrom("warranty_claim").select((eb) => eb.fn.countAll<string>().as("n")).executeTakeFirstOrThrow();
      for (const r of routes) {
        const url = MOUNTS[r.file] + r.path.replace(/:[a-zA-Z]+/g, "1").replace(/\/$/, "");
        const res = await send(r.method, url, headers);
        expect(res.status, `${r.method.toUpperCase()} ${url}`).toBe(403);
        expect(res.body.error?.code ?? res.body.code).toBe("cross_site_request");
        expect(JSON.stringify(res.body)).toMatch(/another site/);
      }
      const after = await t.db.selectFrom("warranty_claim").select((eb) => eb.fn.countAll<string>().as("n")).executeTakeFirstOrThrow();
      expect(after.n).toBe(before.n);
      // still signed in: the forged sign-out did nothing
      expect((await request(t.app).get("/api/me").set("Cookie", clerk)).status).toBe(200);
    });
  }

  it("let the app's own pages through (same origin), and non-browser clients (no Origin)", async () => {
    const cases: Record<string, string>[] = [
      { Origin: OWN, "Sec-Fetch-Site": "same-origin" },
      { Origin: "null", "Sec-Fetch-Site": "same-origin" }, // a same-origin form under a no-referrer policy
      { Origin: OWN },
      {},
    ];
    for (const headers of cases) {
      const res = await send("post", "/api/claims", headers);
      expect(res.status).not.toBe(403);
      expect(res.status).toBe(400); // the empty body is refused by validation, in words
    }
  });
});

describe("private answers", () => {
  it("are marked no-store; the warehouse answers with a data ETag may be kept and revalidated", async () => {
    const analyst = await t.signInAs({ roles: ["analyst"] });
    expect((await request(t.app).get("/api/me").set("Cookie", analyst)).headers["cache-control"]).toBe("no-store");
    expect((await request(t.app).get("/api/repairs.csv").set("Cookie", analyst)).headers["cache-control"]).toBe("no-store");
    expect((await request(t.app).get("/api/analytics/rates/components").set("Cookie", analyst)).headers["cache-control"]).toBe("private, no-cache");
  });
});

describe("the request log", () => {
  it("redacts session cookies and credentials", () => {
    const lines: string[] = [];
    const out = new Writable({ write: (chunk, _e, done) => (lines.push(String(chunk)), done()) });
    pino({ redact: logRedaction }, out).info(
      { req: { headers: { cookie: "ironledger.sid=s%3Asecret", authorization: "Bearer secret" } }, res: { headers: { "set-cookie": ["ironledger.sid=s%3Asecret"] } } },
      "request completed",
    );
    expect(lines.join("")).not.toContain("secret");
    expect(lines.join("")).toContain("[redacted]");
  });
});
