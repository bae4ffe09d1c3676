import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { seedShops, testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import { errorEnvelopeSchema } from "../../shared/schemas/error.js";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
  await seedShops(t.db, [
    { code: "S1", name: "North yard" },
    { code: "S5", name: "Harbour yard" },
  ]);
});
afterAll(async () => t?.drop());

describe("GET /api/health", () => {
  it("answers ok when the database answers", async () => {
    const res = await request(t.app).get(apiPaths.health()).expect(200);
    // the API test app has no object storage or mail server
    expect(res.body).toEqual({ status: "ok", database: "ok", storage: "not_configured", mail: "not_configured" });
  });
});

describe("GET /api/me", () => {
  it("returns 401 in the error envelope without a session", async () => {
    const res = await request(t.app).get(apiPaths.me()).expect(401);
    expect(errorEnvelopeSchema.parse(res.body).error.code).toBe("unauthorized");
  });

  it("returns the user, roles and a group-wide scope for an analyst", async () => {
    const cookie = await t.signInAs({ roles: ["analyst"], name: "A. Analyst" });
    const res = await request(t.app).get(apiPaths.me()).set("Cookie", cookie).expect(200);
    expect(res.body).toMatchObject({ name: "A. Analyst", roles: ["analyst"], scope: { kind: "all" } });
  });

  it("limits a manager's scope to the shops in their claim", async () => {
    const cookie = await t.signInAs({ roles: ["manager"], shops: ["S1"] });
    const res = await request(t.app).get(apiPaths.me()).set("Cookie", cookie).expect(200);
    expect(res.body.scope).toEqual({ kind: "shops", shops: ["S1"] });
  });

  it("rejects a forged session cookie", async () => {
    await request(t.app).get(apiPaths.me()).set("Cookie", "ironledger.sid=s%3Aabc.forged").expect(401);
  });
});

describe("GET /api/admin/users", () => {
  it.each([["analyst"], ["director"], ["manager"], ["clerk"]] as const)("returns 403 for the %s role", async (role) => {
    const cookie = await t.signInAs({ roles: [role], shops: ["S1"] });
    const res = await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie).expect(403);
    expect(errorEnvelopeSchema.parse(res.body).error.code).toBe("forbidden");
  });

  it("returns 200 for an admin", async () => {
    const cookie = await t.signInAs({ roles: ["admin"] });
    const res = await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie).expect(200);
    expect(Array.isArray(res.body.users)).toBe(true);
  });
});

describe("GET /api/shops", () => {
  it("returns 401 without a session", async () => {
    await request(t.app).get(apiPaths.shops()).expect(401);
  });

  it.each([["analyst"], ["director"], ["clerk"], ["admin"]] as const)("lists every shop for the %s role", async (role) => {
    const cookie = await t.signInAs({ roles: [role] });
    const res = await request(t.app).get(apiPaths.shops()).set("Cookie", cookie).expect(200);
    expect(res.body.shops.map((s: { code: string }) => s.code)).toEqual(["S1", "S5"]);
  });

  it("excludes another shop from a manager's list", async () => {
    const cookie = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
    const res = await request(t.app).get(apiPaths.shops()).set("Cookie", cookie).expect(200);
    expect(res.body.shops.map((s: { code: string }) => s.code)).toEqual(["S5"]);
  });
});

describe("unknown API routes", () => {
  it("answer 404 in the error envelope", async () => {
    const res = await request(t.app).get("/api/no-such-thing").expect(404);
    expect(errorEnvelopeSchema.parse(res.body).error.message).toMatch(/no API route/);
  });
});
