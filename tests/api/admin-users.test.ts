import http from "node:http";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedShops, testApp, type TestApp } from "../helpers/test-app.js";
import { startTestStack, type TestStack } from "../helpers/test-stack.js";
import { upsertUser } from "../../server/db/queries/users.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { apiPaths } from "../../shared/api-paths.js";
import { errorEnvelopeSchema } from "../../shared/schemas/error.js";
import { adminUserListSchema, userHistorySchema } from "../../shared/schemas/admin.js";
import type { Role } from "../../shared/roles.js";

// An administrator keeps users' roles and shops in Ironledger. The rule (README.md, "Who decides a user's
// access"): once set here they replace the identity provider's claims for that user, from the user's next
// request; until then the claims apply. Deactivation ends the user's sessions and refuses their sign-ins.
// Locking oneself out is refused. Common practice, no source (OWASP Session Management Cheat Sheet: a
// privilege change takes effect on the server side; end the sessions of a disabled account).

const ORIGIN = "http://127.0.0.1:8080"; // the test app's public URL (tests/helpers/test-app.ts)

let t: TestApp;
const people = {
  admin: { sub: "u-admin", name: "Test Admin", roles: ["admin"] as Role[], shops: [] as string[] },
  manager: { sub: "u-manager", name: "Test Manager", roles: ["manager"] as Role[], shops: ["S1"] },
  analyst: { sub: "u-analyst", name: "Test Analyst", roles: ["analyst"] as Role[], shops: [] as string[] },
};
const cookie: Record<keyof typeof people, string> = { admin: "", manager: "", analyst: "" };

/** A sign-in as the server records it: the user's row (the provider's claims) and a stored session. */
async function signIn(who: keyof typeof people): Promise<string> {
  const p = people[who];
  await upsertUser(t.db, { ...p, email: null });
  return t.signInAs(p);
}

const asAdmin = (method: "put" | "post" | "delete", path: string, body?: object) => {
  const q = request(t.app)[method](path).set("Cookie", cookie.admin).set("Origin", ORIGIN);
  return body ? q.send(body) : q;
};
const history = async (sub: string) =>
  userHistorySchema.parse((await request(t.app).get(apiPaths.adminUserHistory(sub)).set("Cookie", cookie.admin).expect(200)).body).events;
const sessionsOf = async (sub: string) =>
  Number((await t.pool.query(`SELECT count(*) AS n FROM app_session WHERE sess->'user'->>'sub' = $1`, [sub])).rows[0].n);

beforeAll(async () => {
  t = await testApp();
  await seedShops(t.db, [
    { code: "S1", name: "North yard" },
    { code: "S5", name: "Harbour yard" },
  ]);
  for (const k of Object.keys(people) as (keyof typeof people)[]) cookie[k] = await signIn(k);
});
afterAll(async () => t?.drop());

describe("PUT /api/admin/users/:sub/access", () => {
  it("gives a manager a second shop, and the manager's next request sees both", async () => {
    const before = await request(t.app).get(apiPaths.me()).set("Cookie", cookie.manager).expect(200);
    expect(before.body.scope).toEqual({ kind: "shops", shops: ["S1"] });

    const res = await asAdmin("put", apiPaths.adminUserAccess("u-manager"), { roles: ["manager"], shops: ["S1", "s5"] }).expect(200);
    expect(res.body).toMatchObject({ roles: ["manager"], shops: ["S1", "S5"], source: "ironledger", accessSetBy: "Test Admin", provider: { roles: ["manager"], shops: ["S1"] } });

    // the same session, not signed in again
    const me = await request(t.app).get(apiPaths.me()).set("Cookie", cookie.manager).expect(200);
    expect(me.body.scope).toEqual({ kind: "shops", shops: ["S1", "S5"] });
    const shops = await request(t.app).get(apiPaths.shops()).set("Cookie", cookie.manager).expect(200);
    expect(shops.body.shops.map((s: { code: string }) => s.code)).toEqual(["S1", "S5"]);
  });

  it("keeps the change as a sentence saying who changed what, and when", async () => {
    const events = await history("u-manager");
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({
      kind: "access",
      actorName: "Test Admin",
      sentence: "Test Admin changed Test Manager's shops from S1 to S1 and S5 in Ironledger; from now on these replace the identity provider's roles and shops for them.",
    });
    expect(Math.abs(Date.parse(events[0].at) - Date.now())).toBeLessThan(60_000);
  });

  it("keeps the stored access over the provider's claims at the user's next sign-in", async () => {
    cookie.manager = await signIn("manager"); // the provider still says S1 only
    const me = await request(t.app).get(apiPaths.me()).set("Cookie", cookie.manager).expect(200);
    expect(me.body.scope).toEqual({ kind: "shops", shops: ["S1", "S5"] });
    const list = adminUserListSchema.parse((await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie.admin).expect(200)).body);
    expect(list.users.find((u) => u.sub === "u-manager")).toMatchObject({ shops: ["S1", "S5"], provider: { shops: ["S1"] } });
    expect(list.shops.map((s) => s.code)).toEqual(["S1", "S5"]);
  });

  it("gives an analyst the administrator role, and their next request reaches the admin pages", async () => {
    await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie.analyst).expect(403);
    await asAdmin("put", apiPaths.adminUserAccess("u-analyst"), { roles: ["analyst", "admin"], shops: [] }).expect(200);
    await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie.analyst).expect(200);
    expect((await history("u-analyst"))[0].sentence).toBe(
      "Test Admin changed Test Analyst's roles from Group analyst to Group analyst and Administrator in Ironledger; from now on these replace the identity provider's roles and shops for them.",
    );
  });

  it.each([
    [{ roles: [], shops: [] }, "roles: choose at least one role"],
    [{ roles: ["manager"], shops: [] }, "shops: a shop manager needs at least one shop"],
    [{ roles: ["owner"], shops: [] }, "roles.0"],
    [{ roles: ["manager"], shops: ["S/1"] }, "a shop code is 1–16 letters, digits, spaces, - or _"],
  ])("refuses %j in words, changing nothing", async (body, words) => {
    const res = await asAdmin("put", apiPaths.adminUserAccess("u-manager"), body).expect(400);
    expect(errorEnvelopeSchema.parse(res.body).error.message).toContain(words);
    expect(await history("u-manager")).toHaveLength(1);
  });

  it("refuses a shop that is not in the register, naming it", async () => {
    const res = await asAdmin("put", apiPaths.adminUserAccess("u-manager"), { roles: ["manager"], shops: ["S1", "S9"] }).expect(400);
    expect(res.body.error.message).toBe("S9 is not a registered shop. Choose from the shop register.");
  });

  it("refuses an administrator removing their own administrator role, in words", async () => {
    const res = await asAdmin("put", apiPaths.adminUserAccess("u-admin"), { roles: ["analyst"], shops: [] }).expect(409);
    expect(res.body.error.message).toBe("You cannot remove your own administrator role. Another administrator can do it.");
    await request(t.app).get(apiPaths.adminUsers()).set("Cookie", cookie.admin).expect(200);
    expect(await history("u-admin")).toEqual([]);
  });

  it.each([["analyst"], ["director"], ["manager"], ["clerk"]] as const)("returns 403 for the %s role", async (role) => {
    const c = await t.signInAs({ roles: [role], shops: ["S1"] });
    const res = await request(t.app).put(apiPaths.adminUserAccess("u-manager")).set("Cookie", c).set("Origin", ORIGIN).send({ roles: ["admin"], shops: [] }).expect(403);
    expect(res.body.error.code).toBe("forbidden");
  });
});

describe("DELETE /api/admin/users/:sub/access", () => {
  it("returns the user to the provider's claims from their next request, with a sentence", async () => {
    const res = await asAdmin("delete", apiPaths.adminUserAccess("u-manager")).expect(200);
    expect(res.body).toMatchObject({ source: "provider", shops: ["S1"], accessSetAt: null });
    const me = await request(t.app).get(apiPaths.me()).set("Cookie", cookie.manager).expect(200);
    expect(me.body.scope).toEqual({ kind: "shops", shops: ["S1"] });
    expect((await history("u-manager"))[0].sentence).toBe(
      "Test Admin returned Test Manager to the identity provider's roles and shops (Shop manager; shops S1 at their last sign-in), in place of those set in Ironledger (Shop manager; shops S1 and S5).",
    );
  });
});

describe("POST /api/admin/users/:sub/deactivate", () => {
  it("refuses an administrator deactivating themselves, in words", async () => {
    const res = await asAdmin("post", apiPaths.adminUserDeactivate("u-admin")).expect(409);
    expect(res.body.error.message).toBe("You cannot deactivate your own account. Another administrator can do it.");
    await request(t.app).get(apiPaths.me()).set("Cookie", cookie.admin).expect(200);
  });

  it("deletes the user's stored sessions, so their next request is signed out", async () => {
    const second = await t.signInAs(people.manager);
    expect(await sessionsOf("u-manager")).toBeGreaterThanOrEqual(3);
    const res = await asAdmin("post", apiPaths.adminUserDeactivate("u-manager")).expect(200);
    expect(res.body).toMatchObject({ deactivatedBy: "Test Admin" });
    expect(await sessionsOf("u-manager")).toBe(0);
    for (const c of [cookie.manager, second]) await request(t.app).get(apiPaths.me()).set("Cookie", c).expect(401);
    const [event] = await history("u-manager");
    expect(event).toMatchObject({ kind: "deactivated", actorName: "Test Admin" });
    expect(event.sentence).toMatch(/^Test Admin deactivated Test Manager: their \d+ open sessions ended, and their sign-ins are refused\.$/);
  });

  it("ends a session written after the deactivation on its first request, in words", async () => {
    const late = await t.signInAs(people.manager);
    const res = await request(t.app).get(apiPaths.me()).set("Cookie", late).expect(401);
    expect(res.body.error).toMatchObject({ code: "account_deactivated", message: "An administrator has deactivated your Ironledger account, so you cannot sign in. Ask an administrator to reactivate it." });
    expect(await sessionsOf("u-manager")).toBe(0);
  });

  it("lets the user back in once reactivated", async () => {
    await asAdmin("post", apiPaths.adminUserReactivate("u-manager")).expect(200);
    const c = await t.signInAs(people.manager);
    await request(t.app).get(apiPaths.me()).set("Cookie", c).expect(200);
    expect((await history("u-manager"))[0].sentence).toBe("Test Admin reactivated Test Manager: they may sign in again.");
  });

  it("answers 404 in words for someone who never signed in", async () => {
    const res = await asAdmin("post", apiPaths.adminUserDeactivate("no-one")).expect(404);
    expect(res.body.error.message).toBe("No one with that identity has signed in to Ironledger.");
  });
});

/** A few lines of browser: cookies per host, no redirects followed unless asked. */
class Client {
  private readonly jar = new Map<string, Map<string, string>>();
  send(method: string, url: string, form?: Record<string, string>, headers: Record<string, string> = {}): Promise<{ status: number; location?: string; text: string }> {
    const u = new URL(url);
    const cookies = this.jar.get(u.host);
    const body = form ? new URLSearchParams(form).toString() : undefined;
    return new Promise((resolve, reject) => {
      const req = http.request(
        {
          method, host: u.hostname, port: u.port, path: u.pathname + u.search,
          headers: {
            ...headers,
            ...(cookies?.size ? { cookie: [...cookies].map(([k, v]) => `${k}=${v}`).join("; ") } : {}),
            ...(body ? { "content-type": "application/x-www-form-urlencoded", "content-length": String(Buffer.byteLength(body)) } : {}),
          },
        },
        (res) => {
          for (const c of res.headers["set-cookie"] ?? []) {
            const [pair] = c.split(";");
            const eq = pair.indexOf("=");
            const jar = this.jar.get(u.host) ?? new Map<string, string>();
            jar.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
            this.jar.set(u.host, jar);
          }
          let text = "";
          res.setEncoding("utf8");
          res.on("data", (d: string) => (text += d));
          res.on("end", () => resolve({ status: res.statusCode ?? 0, location: res.headers.location, text }));
        },
      );
      req.on("error", reject);
      req.end(body);
    });
  }
  async follow(url: string, first?: { status: number; location?: string; text: string }) {
    let a = first ?? (await this.send("GET", url));
    for (let hops = 0; a.status >= 300 && a.status < 400 && hops < 10; hops++) {
      url = new URL(String(a.location), url).href;
      a = await this.send("GET", url);
    }
    return { url, answer: a };
  }
}

describe("GET /auth/callback for a deactivated user (the local provider's sign-in, end to end)", () => {
  let stack: TestStack;
  beforeAll(async () => {
    stack = await startTestStack();
  }, 300_000);
  afterAll(async () => stack?.stop());

  const signInThroughProvider = async (c: Client, username: string) => {
    const { url } = await c.follow(`${stack.url}/auth/login`);
    const a = await c.send("POST", `${url}/login`, { username, password: DEMO_PASSWORD });
    return (await c.follow(`${url}/login`, a)).answer;
  };

  it("refuses the sign-in in words and opens no session", async () => {
    const manager = new Client();
    await signInThroughProvider(manager, "manager.s5");
    expect(JSON.parse((await manager.send("GET", `${stack.url}/api/me`)).text)).toMatchObject({ name: "Ysolde Brack" });

    const admin = new Client();
    await signInThroughProvider(admin, "admin");
    const off = await admin.send("POST", `${stack.url}${apiPaths.adminUserDeactivate("manager.s5")}`, undefined, { origin: stack.url });
    expect(off.status).toBe(200);
    expect((await manager.send("GET", `${stack.url}/api/me`)).status).toBe(401);

    const again = await signInThroughProvider(new Client(), "manager.s5");
    expect(again.status).toBe(403);
    expect(JSON.parse(again.text).error).toMatchObject({
      code: "account_deactivated",
      message: "An administrator has deactivated your Ironledger account, so you cannot sign in. Ask an administrator to reactivate it.",
    });
    const open = await stack.pool.query(`SELECT count(*) AS n FROM app_session WHERE sess->'user'->>'sub' = 'manager.s5'`);
    expect(Number(open.rows[0].n)).toBe(0);
  }, 120_000);
});
