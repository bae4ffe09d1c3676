import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import { adminSettingsSchema, settingsSchema } from "../../shared/schemas/settings.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// The group's currency, set once by an administrator and read by every role. Codes are ISO 4217
// (USD, EUR, GBP are active codes of ISO 4217; "EURO" and "XQZ" are not codes).

const ORIGIN = "http://127.0.0.1:8080";

let t: TestApp;
let admin: string;
let clerk: string;

const put = (cookie: string, body: unknown) => request(t.app).put(apiPaths.adminSettings()).set("Cookie", cookie).set("Origin", ORIGIN).send(body as object);
const read = async (cookie: string) => settingsSchema.parse((await request(t.app).get(apiPaths.settings()).set("Cookie", cookie).expect(200)).body);

beforeAll(async () => {
  t = await testApp();
  admin = await t.signInAs({ roles: ["admin"], name: "Test Admin" });
  clerk = await t.signInAs({ roles: ["clerk"], shops: ["S1"] });
}, 120_000);
afterAll(async () => t?.drop());

describe("GET /api/settings", () => {
  it("answers the fallback currency, marked as not set, before an administrator sets one", async () => {
    expect(await read(clerk)).toEqual({ currency: "USD", currencySet: false, currencySetAt: null, currencySetBy: null });
  });
});

describe("PUT /api/admin/settings", () => {
  it("refuses text that is not an ISO 4217 code with 400 in words, and stores nothing", async () => {
    for (const currency of ["EURO", "XQZ", "", 12]) {
      const res = await put(admin, { currency });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe("validation_failed");
      expect(res.body.error.message).toMatch(/ISO 4217|three-letter/);
    }
    expect((await read(clerk)).currencySet).toBe(false);
  });

  it("stores the code for every role, upper-cased, and keeps each change as a sentence", async () => {
    const first = adminSettingsSchema.parse((await put(admin, { currency: " eur " }).expect(200)).body);
    expect(first.settings).toMatchObject({ currency: "EUR", currencySet: true, currencySetBy: "Test Admin" });
    expect(await read(clerk)).toMatchObject({ currency: "EUR", currencySet: true });

    await put(admin, { currency: "EUR" }).expect(200); // unchanged: no new event
    const second = adminSettingsSchema.parse((await put(admin, { currency: "GBP" }).expect(200)).body);
    expect(second.history.map((e) => e.sentence)).toEqual([
      "Test Admin changed the group's currency from EUR to GBP.",
      "Test Admin set the group's currency to EUR.",
    ]);
    expect((await read(clerk)).currency).toBe("GBP");
  });

  it("refuses every role but the administrator", async () => {
    expect((await put(clerk, { currency: "USD" })).status).toBe(403);
    expect((await read(clerk)).currency).toBe("GBP");
  });
});
