import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import express from "express";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../server/app.js";
import { createOidcClient } from "../../server/auth/oidc-client.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { PreparedJson } from "../../server/http/prepared-json.js";
import { AnswerCache } from "../../server/services/answer-cache.js";

// Conditional requests and caching as RFC 9110 §13.1.2 (If-None-Match → 304) and RFC 9111 §5.2.2
// (no-cache, private, immutable: RFC 8246) define them; content coding as RFC 9110 §8.4 (br: RFC 7932).
let t: TestApp;
let analyst: string;
let manager: string;
const route = "/api/analytics/rates/components";

beforeAll(async () => {
  t = await testApp();
  analyst = await t.signInAs({ roles: ["analyst"] });
  manager = await t.signInAs({ roles: ["manager"], shops: ["S1"] });
}, 120_000);
afterAll(async () => t?.drop());

describe("answers computed from the warehouse", () => {
  it("carry an ETag and answer 304 without a body while the data is unchanged", async () => {
    const first = await request(t.app).get(route).set("Cookie", analyst);
    expect(first.status).toBe(200);
    const tag = first.headers.etag as string;
    expect(tag).toMatch(/^W\/"/);
    expect(first.headers["cache-control"]).toBe("private, no-cache");
    const again = await request(t.app).get(route).set("Cookie", analyst).set("If-None-Match", tag);
    expect(again.status).toBe(304);
    expect(again.text).toBe("");
  });

  it("give another user with another scope another tag", async () => {
    const a = await request(t.app).get(route).set("Cookie", analyst);
    const m = await request(t.app).get(route).set("Cookie", manager).set("If-None-Match", a.headers.etag as string);
    expect(m.status).toBe(200);
    expect(m.headers.etag).not.toBe(a.headers.etag);
  });

  it("answer 200 with a new tag once a load has changed the data", async () => {
    const before = await request(t.app).get(route).set("Cookie", analyst);
    await t.db
      .insertInto("etl_batch")
      .values({ file_name: "x.csv", sha256: "0".repeat(64), profile: "generic-jobs", kind: "jobs", shop_code: null, loaded_by: "test", status: "loaded", finished_at: new Date(), error_message: null })
      .execute();
    const after = await request(t.app).get(route).set("Cookie", analyst).set("If-None-Match", before.headers.etag as string);
    expect(after.status).toBe(200);
    expect(after.headers.etag).not.toBe(before.headers.etag);
  });

  it("never tag an error", async () => {
    const bad = await request(t.app).get("/api/analytics/rates/components?from=not-a-date").set("Cookie", analyst);
    expect(bad.status).toBe(400);
    expect(bad.headers["cache-control"]).not.toBe("private, no-cache");
    const good = await request(t.app).get(route).set("Cookie", analyst);
    const forbidden = await request(t.app).get(route).set("Cookie", await t.signInAs({ roles: [] })).set("If-None-Match", good.headers.etag as string);
    expect(forbidden.status).toBe(403);
  });
});

describe("answers kept whole between loads", () => {
  it("are the same JSON whether sent brotli-compressed, gzipped or as they are, and compressed answers are smaller", async () => {
    // a large answer (about 60 KB) sent the way the analytics routes send theirs
    const answer = new PreparedJson({ rows: Array.from({ length: 2000 }, (_, i) => ({ id: i, band: `band ${i % 7}` })) });
    const app = express().get("/x", (req, res) => void answer.send(req, res));
    const raw = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => cb(null, Buffer.concat(chunks)));
    };
    const get = (encoding: string) => request(app).get("/x").set("Accept-Encoding", encoding).buffer(true).parse(raw);
    const plain = await get("identity");
    expect(plain.headers["content-encoding"]).toBeUndefined();
    const body = plain.body as Buffer;
    expect(Number(plain.headers["content-length"])).toBe(body.length);
    const br = await get("br, gzip");
    expect(br.headers["content-encoding"]).toBe("br");
    expect(br.headers.vary).toMatch(/Accept-Encoding/i);
    const gz = await get("gzip");
    expect(gz.headers["content-encoding"]).toBe("gzip");
    // the bytes on the wire are the compressed ones; the client (superagent) decodes them back to the body
    expect(Number(br.headers["content-length"])).toBeLessThan(body.length / 4);
    expect(Number(gz.headers["content-length"])).toBeLessThan(body.length / 4);
    expect((br.body as Buffer).equals(body)).toBe(true);
    expect((gz.body as Buffer).equals(body)).toBe(true);
    expect(JSON.parse(body.toString("utf8")).rows).toHaveLength(2000);
  });

  it("are computed once per data version, however many ask at once, and again after a load", async () => {
    const cache = new AnswerCache(t.db, 10);
    let computed = 0;
    const compute = async () => ({ n: ++computed });
    const first = await Promise.all([1, 2, 3].map(() => cache.answer(["k"], compute)));
    expect(computed).toBe(1);
    expect(new Set(first).size).toBe(1);
    expect(JSON.parse((await cache.answer(["k"], compute)).body.toString())).toEqual({ n: 1 });
    await t.db
      .insertInto("etl_batch")
      .values({ file_name: "y.csv", sha256: "1".repeat(64), profile: "generic-jobs", kind: "jobs", shop_code: null, loaded_by: "test", status: "loaded", finished_at: new Date(), error_message: null })
      .execute();
    expect(JSON.parse((await cache.answer(["k"], compute)).body.toString())).toEqual({ n: 2 });
  });
});

describe("compression and the built client", () => {
  let dir: string;
  let app: ReturnType<typeof createApp>;
  beforeAll(() => {
    dir = mkdtempSync(path.join(os.tmpdir(), "il-static-"));
    mkdirSync(path.join(dir, "assets"));
    writeFileSync(path.join(dir, "index.html"), "<!doctype html><title>x</title>");
    writeFileSync(path.join(dir, "assets", "app-Ab12Cd34.js"), `export const x = "${"ledger ".repeat(500)}";`);
    app = createApp({
      db: t.db, pool: t.pool, publicUrl: "http://127.0.0.1:8080", sessionSecret: "s",
      oidc: createOidcClient({ issuer: "http://127.0.0.1:9", clientId: "c", clientSecret: "c" }),
      issuer: "http://127.0.0.1:9", scopes: "openid", rolesClaim: "roles", shopsClaim: "shops", staticDir: dir,
    });
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("sends hashed assets brotli-compressed and cached for a year, immutable", async () => {
    const res = await request(app).get("/assets/app-Ab12Cd34.js").set("Accept-Encoding", "br");
    expect(res.status).toBe(200);
    expect(res.headers["content-encoding"]).toBe("br");
    expect(res.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    expect(res.text).toContain("ledger ledger"); // supertest decoded the brotli body
  });

  it("revalidates the page itself on every visit, and answers 404 for a missing asset", async () => {
    const page = await request(app).get("/clusters/abc");
    expect(page.status).toBe(200);
    expect(page.headers["cache-control"]).toBe("no-cache");
    expect((await request(app).get("/assets/gone-00000000.js")).status).toBe(404);
  });

  it("gzips for a client that accepts only gzip, and sends small answers as they are", async () => {
    const big = await request(app).get("/assets/app-Ab12Cd34.js").set("Accept-Encoding", "gzip");
    expect(big.headers["content-encoding"]).toBe("gzip");
    const small = await request(app).get("/clusters").set("Accept-Encoding", "gzip, br");
    expect(small.headers["content-encoding"]).toBeUndefined();
  });
});
