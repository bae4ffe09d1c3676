import http from "node:http";
import { randomBytes } from "node:crypto";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { createApp } from "../../server/app.js";
import { createOidcClient } from "../../server/auth/oidc-client.js";
import { serviceSessionCookie } from "../../server/auth/service-session.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { defaultRateLimits, type RateLimits } from "../../server/config.js";
import { loadOrCreateSecrets } from "../../server/secrets.js";
import { waitInWords } from "../../server/http/rate-limits.js";
import { errorEnvelopeSchema } from "../../shared/schemas/error.js";
import type { Role } from "../../shared/roles.js";
import { startTestStack, type TestStack } from "../helpers/test-stack.js";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";

// Request limits: failed sign-ins per address and account name, and uploads per user (common practice, no
// source: OWASP's Authentication Cheat Sheet advises limiting failed attempts without locking an account for
// everyone; the counts are this project's, see docs/reliability.md). "Another address" is a real one: Linux
// answers the whole 127.0.0.0/8 on loopback, so a client bound to 127.0.0.2 arrives from there.

interface Answer {
  status: number;
  headers: http.IncomingHttpHeaders;
  text: string;
}

/** A browser of a few lines: cookies per host:port, requests sent from a local address (`from`), no redirects followed. */
class Client {
  private readonly jar = new Map<string, Map<string, string>>();
  constructor(public from: string) {}

  send(method: string, url: string, form?: Record<string, string>): Promise<Answer> {
    const u = new URL(url);
    const cookies = this.jar.get(u.host);
    const body = form ? new URLSearchParams(form).toString() : undefined;
    return new Promise((resolve, reject) => {
      const req = http.request(
        {
          method,
          host: u.hostname,
          port: u.port,
          path: u.pathname + u.search,
          localAddress: this.from,
          headers: {
            ...(cookies?.size ? { cookie: [...cookies].map(([k, v]) => `${k}=${v}`).join("; ") } : {}),
            ...(body ? { "content-type": "application/x-www-form-urlencoded", "content-length": Buffer.byteLength(body) } : {}),
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
          res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, text }));
        },
      );
      req.on("error", reject);
      req.end(body);
    });
  }

  /** GETs from `url`, following redirects; the last answer and its address. */
  async follow(url: string, first?: Answer): Promise<{ url: string; answer: Answer }> {
    let answer = first ?? (await this.send("GET", url));
    for (let hops = 0; answer.status >= 300 && answer.status < 400 && hops < 10; hops++) {
      url = new URL(String(answer.headers.location), url).href;
      answer = await this.send("GET", url);
    }
    return { url, answer };
  }
}

let stack: TestStack;
let provider: string;
beforeAll(async () => {
  stack = await startTestStack({}, { demo: true });
  provider = stack.issuer;
}, 600_000);
afterAll(async () => stack?.stop());

/** Starts a sign-in at the app and lands on the provider's form; the form's address. */
async function openForm(c: Client): Promise<string> {
  const { url, answer } = await c.follow(`${stack.url}/auth/login`);
  expect(answer.status, answer.text.slice(0, 200)).toBe(200);
  expect(url).toMatch(/\/interaction\/[^/]+$/);
  return `${url}/login`;
}

/** Submits the form; on success follows the redirects back to the app. */
async function submit(c: Client, form: string, username: string, password: string): Promise<Answer> {
  const a = await c.send("POST", form, { username, password });
  if (a.status !== 303 && a.status !== 302) return a;
  return (await c.follow(form, a)).answer;
}

const me = async (c: Client) => JSON.parse((await c.send("GET", `${stack.url}/api/me`)).text) as { name?: string; error?: unknown };

describe("POST /interaction/:uid/login (the local provider's sign-in form)", () => {
  it("refuses the 11th wrong password for one account from one address with a 429 page that says when to try again", async () => {
    const c = new Client("127.0.0.1");
    const form = await openForm(c);
    const answers: Answer[] = [];
    for (let i = 0; i < 40; i++) answers.push(await submit(c, form, "analyst", `wrong-${i}`));
    const n = defaultRateLimits.signInFailuresPerAccountAndAddress;
    expect(answers.map((a) => a.status)).toEqual([...Array<number>(n).fill(401), ...Array<number>(40 - n).fill(429)]);
    expect(answers[0].text).toMatch(/do not match a demo account/);
    const refused = answers[n];
    expect(refused.headers["content-type"]).toMatch(/text\/html/);
    expect(refused.text).toMatch(/Too many failed sign-ins for this username from your network address \(10 in 15 minutes\)\. Try again in 15 minutes/);
    expect(Number(refused.headers["retry-after"])).toBeGreaterThan(14 * 60);
    expect(refused.text).toMatch(/name="password"/); // the form is still there
    // the right password does not get through that address for that account either, until the window ends
    expect((await submit(c, form, "analyst", DEMO_PASSWORD)).status).toBe(429);
  });

  it("lets the same account sign in from another address", async () => {
    const c = new Client("127.0.0.2");
    await submit(c, await openForm(c), "analyst", DEMO_PASSWORD);
    expect(await me(c)).toMatchObject({ name: "Teodor Quill" });
  });

  it("lets another account sign in from the address that was refused", async () => {
    const c = new Client("127.0.0.1");
    await submit(c, await openForm(c), "clerk", DEMO_PASSWORD);
    expect(await me(c)).toMatchObject({ name: "Pim Aldous" });
  });

  it("refuses an address that tries many account names once it has failed 50 times", async () => {
    const c = new Client("127.0.0.3");
    const form = await openForm(c);
    const statuses: number[] = [];
    for (let i = 0; i <= defaultRateLimits.signInFailuresPerAddress; i++) statuses.push((await submit(c, form, `nobody-${i}`, "guess")).status);
    expect(statuses.slice(0, -1).every((s) => s === 401)).toBe(true);
    const last = await submit(c, form, "director", DEMO_PASSWORD);
    expect(last.status).toBe(429);
    expect(last.text).toMatch(/Too many failed sign-ins from your network address \(50 in 15 minutes\)\. Try again in (15|14) minutes/);
  });

  it("refuses an account guessed from many addresses once 100 attempts have failed, without touching other accounts", async () => {
    // one form, submitted from ever new addresses, each staying under its own limit of 10
    const c = new Client("127.0.0.4");
    const form = await openForm(c);
    const per = defaultRateLimits.signInFailuresPerAccountAndAddress;
    const total = defaultRateLimits.signInFailuresPerAccount;
    for (let failed = 0; failed < total; failed++) {
      c.from = `127.0.1.${10 + Math.floor(failed / per)}`;
      expect((await submit(c, form, "manager.s1", "guess")).status).toBe(401);
    }
    c.from = "127.0.2.1";
    const refused = await submit(c, form, "manager.s1", DEMO_PASSWORD);
    expect(refused.status).toBe(429);
    expect(refused.text).toMatch(/Too many failed sign-ins for this username \(100 in 15 minutes, from any address\)/);
    const other = new Client("127.0.2.2");
    await submit(other, await openForm(other), "manager.s5", DEMO_PASSWORD);
    expect(await me(other)).toMatchObject({ name: "Ysolde Brack" });
  });
});

describe("POST /interaction/:uid/login with a body it will not read", () => {
  it("answers a form larger than 16 kB with a 413 page in words, not a stack trace", async () => {
    const c = new Client("127.0.0.5");
    const answer = await c.send("POST", await openForm(c), { username: "analyst", password: "x".repeat(20_000) });
    expect(answer.status).toBe(413);
    expect(answer.headers["content-type"]).toMatch(/text\/html/);
    expect(answer.text).toMatch(/The request body is larger than 16 kB.*Start again from Ironledger&#39;s sign-in page/);
    expect(answer.text).not.toMatch(/node_modules|PayloadTooLargeError/);
  });
});

describe("POST /api/claims/:id/attachments", () => {
  const pdf = Buffer.from("%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n");
  const cookieFor = (roles: Role[]) =>
    serviceSessionCookie(stack.pool, loadOrCreateSecrets(stack.dataDir).sessionSecret, {
      sub: `clerk-${randomBytes(4).toString("hex")}`,
      name: "Upload Clerk",
      email: null,
      roles,
      shops: [],
    });
  let claimId: string;
  beforeAll(async () => {
    const line = await sql<{ key: string }>`
      SELECT fl.repair_line_key::text AS key FROM fact_repair_line fl
      JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
      WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter <= 3000
        AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      ORDER BY fl.repair_line_key LIMIT 1`.execute(stack.db);
    const res = await request(stack.url).post("/api/claims").set("Cookie", await cookieFor(["clerk"])).send({ kind: "repair", repairLineId: line.rows[0].key }).expect(201);
    claimId = res.body.id;
  }, 60_000);

  it("takes 30 uploads from one user in 10 minutes, refuses the 31st with 429 too_many_uploads in words, and still takes another user's", async () => {
    const clerk = await cookieFor(["clerk"]);
    const upload = (cookie: string) => request(stack.url).post(`/api/claims/${claimId}/attachments`).set("Cookie", cookie).attach("file", pdf, "report.pdf");
    for (let i = 0; i < defaultRateLimits.uploadsPerUser; i++) await upload(clerk).expect(201);
    const refused = await upload(clerk).expect(429);
    const e = errorEnvelopeSchema.parse(refused.body).error;
    expect(e.code).toBe("too_many_uploads");
    expect(e.message).toMatch(/You have uploaded 30 files in the last 10 minutes.*Nothing was saved from this one; try again in 10 minutes\./);
    expect(Number(refused.headers["retry-after"])).toBeGreaterThan(9 * 60);
    const stored = await sql<{ n: string }>`SELECT count(*)::text AS n FROM warranty_attachment WHERE claim_id = ${claimId}`.execute(stack.db);
    expect(Number(stored.rows[0].n)).toBe(30);
    await upload(await cookieFor(["clerk"])).expect(201);
  }, 120_000);
});

describe("GET /auth/login and /auth/callback", () => {
  let tdb: TestDb;
  const limits: RateLimits = { ...defaultRateLimits, signInStartsPerAddress: 3, signInFailuresPerAddress: 2 };
  let app: ReturnType<typeof createApp>;
  beforeAll(async () => {
    tdb = await freshTestDb();
    const issuer = "http://127.0.0.1:9"; // never answers: every start is a 503, which counts all the same
    app = createApp({
      db: tdb.db, pool: tdb.pool, publicUrl: "http://127.0.0.1:8080", sessionSecret: "rate-limit-test",
      oidc: createOidcClient({ issuer, clientId: "test", clientSecret: "test" }),
      issuer, scopes: "openid", rolesClaim: "roles", shopsClaim: "shops", rateLimits: limits,
    });
  }, 120_000);
  afterAll(async () => tdb?.drop());

  it("refuses a fourth sign-in start from one address within the window with 429 in the error envelope", async () => {
    for (let i = 0; i < 3; i++) expect((await request(app).get("/auth/login")).status).not.toBe(429);
    const res = await request(app).get("/auth/login").expect(429);
    const e = errorEnvelopeSchema.parse(res.body).error;
    expect(e.code).toBe("too_many_sign_in_attempts");
    expect(e.message).toBe("Too many sign-ins started from your network address (3 in 15 minutes). Try again in 15 minutes.");
  });

  it("refuses callbacks from an address after two that failed", async () => {
    await request(app).get("/auth/callback?code=x&state=y").expect(400);
    await request(app).get("/auth/callback?code=x&state=y").expect(400);
    const res = await request(app).get("/auth/callback?code=x&state=y").expect(429);
    expect(res.body.error.message).toMatch(/^Too many sign-ins that could not be completed from your network address \(2 in 15 minutes\)\. Try again in 15 minutes\.$/);
  });
});

describe("waitInWords", () => {
  it("rounds the wait up to whole minutes and says a single minute as words", () => {
    const now = Date.UTC(2026, 0, 1, 12, 0, 0);
    expect(waitInWords(new Date(now + 14 * 60_000 + 1), 15 * 60_000, now)).toBe("in 15 minutes");
    expect(waitInWords(new Date(now + 30_000), 15 * 60_000, now)).toBe("in a minute");
    expect(waitInWords(new Date(now - 5_000), 15 * 60_000, now)).toBe("in a minute");
    expect(waitInWords(undefined, 10 * 60_000, now)).toBe("in 10 minutes");
  });
});
