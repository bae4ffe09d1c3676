import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testApp, type TestApp } from "../helpers/test-app.js";

// Wrong input is the caller's mistake: a 4xx in the error envelope, in words, never a 500 or a database
// message. The limits are PostgreSQL's own (bigint is a signed 64-bit integer: −9223372036854775808 to
// 9223372036854775807; text may not contain NUL) — PostgreSQL documentation, "Numeric Types", "Character Types".

let t: TestApp;
let analyst: string;
let clerk: string;
beforeAll(async () => {
  t = await testApp();
  analyst = await t.signInAs({ roles: ["analyst"] });
  clerk = await t.signInAs({ roles: ["clerk"] });
}, 120_000);
afterAll(async () => t?.drop());

const cases: [string, () => string][] = [
  ["a NUL byte in the repairs search", () => "/api/repairs?q=ab%00cd"],
  ["a NUL byte in a filter", () => "/api/analytics/rates/components?shops=S1%00"],
  ["a NUL byte in the path", () => "/api/repairs/12%0034"],
  ["a repair id beyond 64 bits", () => "/api/repairs/99999999999999999999"],
  ["a repair id just beyond the largest bigint", () => "/api/repairs/9223372036854775808"],
  ["a claim preview for a line id beyond 64 bits", () => "/api/claims/preview?repairLine=99999999999999999999"],
  ["a claim id beyond 64 bits", () => "/api/claims/99999999999999999999"],
];

describe("hostile parameters", () => {
  for (const [name, url] of cases) {
    it(`answer ${name} with a 4xx in words`, async () => {
      const cookie = url().startsWith("/api/claims") ? clerk : analyst;
      const res = await request(t.app).get(url()).set("Cookie", cookie);
      expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(400);
      expect(res.status).toBeLessThan(500);
      expect(typeof res.body.error?.message).toBe("string");
      expect(res.body.error.message).not.toMatch(/out of range|invalid byte sequence|syntax for type|unsupported Unicode/i);
    });
  }
});

describe("a JSON body with a NUL character", () => {
  it("is refused with a 400 in words, and nothing is stored", async () => {
    const res = await request(t.app)
      .post("/api/claims")
      .set("Cookie", clerk)
      .send({ kind: "repair", repairLine: "1", note: "bad\u0000byte" });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("nul_character");
    const n = await t.db.selectFrom("warranty_claim").select((eb) => eb.fn.countAll<string>().as("n")).executeTakeFirstOrThrow();
    expect(Number(n.n)).toBe(0);
  });
});

