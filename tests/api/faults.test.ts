import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { execFile } from "node:child_process";
import { promisify } from "node:util";
import type { Server } from "node:http";
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { crc32, deflateSync } from "node:zlib";
import pg from "pg";
import { sql } from "kysely";
import { createDb, type Db } from "../../server/db/database.js";
import { migrateToLatest } from "../../server/db/migrate.js";
import { serviceSessionCookie } from "../../server/auth/service-session.js";
import { loadOrCreateSecrets } from "../../server/secrets.js";
import { startSmtpFake } from "../../server/dev/smtp-fake.js";
import { startS3Fake } from "../../server/dev/s3-fake.js";
import { appOver, seedShops, SESSION_SECRET } from "../helpers/test-app.js";
import { freePort, startTestStack, type TestStack } from "../helpers/test-stack.js";
import { parseMail } from "../helpers/read-mail.js";
import { apiPaths } from "../../shared/api-paths.js";
import { errorEnvelopeSchema } from "../../shared/schemas/error.js";
import type { Role } from "../../shared/roles.js";
import type { ClaimDetail } from "../../shared/schemas/claims.js";

// Each dependency failing on its own, under a running server: the answer is a 503 that names it, in words,
// and the same server serves again once the dependency is back.

const root = path.resolve(import.meta.dirname, "../..");
const run = promisify(execFile);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls `probe` until it returns true or `ms` pass; returns whether it did. */
async function until(probe: () => Promise<boolean>, ms: number, every = 250): Promise<boolean> {
  const end = Date.now() + ms;
  for (;;) {
    if (await probe()) return true;
    if (Date.now() > end) return false;
    await sleep(every);
  }
}

/** A 503 in the error envelope with `code`, and a Retry-After; the message in words, without driver text. */
function expectDependency503(res: request.Response, code: string, words: RegExp): void {
  expect(res.status).toBe(503);
  const e = errorEnvelopeSchema.parse(res.body).error;
  expect(e.code).toBe(code);
  expect(e.message).toMatch(words);
  expect(e.message).not.toMatch(/ECONN|127\.0\.0\.1|localhost|terminat|SQLSTATE|\bpg\b/i);
  expect(e.requestId).toBeTruthy();
  expect(res.headers["retry-after"]).toMatch(/^\d+$/);
}

describe("PostgreSQL stopped under traffic and started again", () => {
  let dir: string;
  let port: number;
  let db: Db;
  let pool: pg.Pool;
  let server: Server;
  let clerk: string;
  const pgCtl = (cmd: "start" | "stop") => run("bash", [path.join(root, "scripts/pg.sh"), cmd, dir, String(port)], { cwd: root });

  beforeAll(async () => {
    // a cluster of this test's own, so stopping it touches no other test
    dir = mkdtempSync(path.join(root, ".data", "faults-pg-"));
    port = await freePort();
    await pgCtl("start");
    const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
    await admin.connect();
    await admin.query("CREATE DATABASE ironledger");
    await admin.end();
    ({ db, pool } = createDb(`postgres://postgres@127.0.0.1:${port}/ironledger`, 5));
    await migrateToLatest(db);
    await seedShops(db, [{ code: "S1", name: "North yard" }]);
    const app = appOver({ db, pool });
    server = await new Promise<Server>((resolve) => {
      const s = app.listen(0, "127.0.0.1", () => resolve(s));
    });
    clerk = await serviceSessionCookie(pool, SESSION_SECRET, { sub: "fault-clerk", name: "Fault Clerk", email: null, roles: ["clerk"], shops: [] }, 1);
  }, 120_000);

  afterAll(async () => {
    await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
    server?.closeAllConnections();
    await db?.destroy();
    if (dir) {
      await pgCtl("stop");
      rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);

  /** The requests a signed-in clerk's page makes (the session, a warehouse read, the claim queue) and health. */
  const urls: [string, boolean][] = [
    [apiPaths.health(), false],
    [apiPaths.health(), true],
    [apiPaths.me(), true],
    ["/api/shops", true],
    ["/api/claims", true],
  ];
  const calls = () =>
    Promise.all(
      urls.map(async ([url, signedIn]) => {
        const res = await (signedIn ? request(server).get(url).set("Cookie", clerk) : request(server).get(url));
        return Object.assign(res, { url });
      }),
    );

  it("answers every request before the stop", async () => {
    for (const r of await calls()) expect(r.status).toBe(200);
    const health = await request(server).get(apiPaths.health()).expect(200);
    expect(health.body).toEqual({ status: "ok", database: "ok", storage: "not_configured", mail: "not_configured" });
  });

  it("answers 503 database_unavailable in words, never 500, while the server stops under traffic", async () => {
    const seen: Awaited<ReturnType<typeof calls>> = [];
    let stopped = false;
    const traffic = Promise.all(
      Array.from({ length: 3 }, async () => {
        while (!stopped) seen.push(...(await calls()));
      }),
    );
    await sleep(300);
    await pgCtl("stop");
    await sleep(1000);
    stopped = true;
    await traffic;

    expect(seen.length).toBeGreaterThan(15);
    expect(seen.filter((r) => r.status !== 200 && r.status !== 503).map((r) => `${r.status} ${r.url} ${JSON.stringify(r.body)}`)).toEqual([]);
    const refused = seen.filter((r) => r.status === 503);
    expect(refused.length).toBeGreaterThan(0);
    for (const r of refused) {
      if (r.url === apiPaths.health()) expect(r.body).toMatchObject({ status: "unavailable", database: "unavailable" });
      else expectDependency503(r, "database_unavailable", /database is not answering/);
    }
  });

  it("answers health without a session, and every signed-in request with 503, while the server is down", async () => {
    const [health, healthWithCookie, me, shops, claims] = await calls();
    for (const h of [health, healthWithCookie]) {
      expect(h.status).toBe(503);
      expect(h.body).toEqual({ status: "unavailable", database: "unavailable", storage: "not_configured", mail: "not_configured" });
      expect(JSON.stringify(h.body)).not.toMatch(/127\.0\.0\.1|postgres|\d{4,}/);
    }
    for (const r of [me, shops, claims]) expectDependency503(r, "database_unavailable", /warehouse database is not answering; try again/);
  });

  it("serves the same requests, with the same session, once the server is back, without a restart of the app", async () => {
    await pgCtl("start");
    const [health, healthWithCookie, me, shops, claims] = await calls();
    for (const r of [health, healthWithCookie, me, shops, claims]) expect(r.status).toBe(200);
    expect(health.body).toEqual({ status: "ok", database: "ok", storage: "not_configured", mail: "not_configured" });
    expect(me.body).toMatchObject({ name: "Fault Clerk", roles: ["clerk"] });
    expect(shops.body.shops.map((s: { code: string }) => s.code)).toEqual(["S1"]);
  });
});

/** A small solid-colour PNG (8-bit RGB), built by hand: signature, IHDR, one IDAT, IEND. */
function png(width: number, height: number, rgb: [number, number, number]): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const body = Buffer.concat([Buffer.from(type, "ascii"), data]);
    const out = Buffer.alloc(12 + data.length);
    out.writeUInt32BE(data.length, 0);
    body.copy(out, 4);
    out.writeUInt32BE(crc32(body) >>> 0, 8 + data.length);
    return out;
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr.set([8, 2, 0, 0, 0], 8);
  const row = Buffer.concat([Buffer.from([0]), Buffer.from(Array.from({ length: width }, () => rgb).flat())]);
  const raw = Buffer.concat(Array.from({ length: height }, () => row));
  return Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk("IHDR", ihdr), chunk("IDAT", deflateSync(raw)), chunk("IEND", Buffer.alloc(0))]);
}

/** Closed, covered heater-plug lines not yet on a claim (engine cover 36 months / 3,000 h in the demo world). */
async function coveredLines(db: Db, n: number): Promise<string[]> {
  const r = await sql<{ key: string }>`
    SELECT fl.repair_line_key::text AS key FROM fact_repair_line fl
    JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter <= 3000
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
    ORDER BY fl.repair_line_key DESC LIMIT ${n}`.execute(db);
  return r.rows.map((x) => x.key);
}

describe("object storage and the mail server down, each on its own, under the whole stack", () => {
  const work = mkdtempSync(path.join(tmpdir(), "ironledger-faults-"));
  const objectsDir = path.join(work, "objects");
  const mailDir = path.join(work, "mail");
  const bucket = "fault-evidence";
  let s3Port: number;
  let smtpPort: number;
  let s3: Awaited<ReturnType<typeof startS3Fake>> | null = null;
  let smtp: Awaited<ReturnType<typeof startSmtpFake>> | null = null;
  let stack: TestStack;
  let clerk: string;
  let lines: string[];
  const photo = png(48, 32, [30, 120, 200]);

  const startS3 = async () => {
    s3 = await startS3Fake(s3Port, objectsDir, bucket);
  };
  const stopS3 = async () => {
    await s3?.close();
    s3 = null;
  };
  const startSmtp = async () => {
    smtp = await startSmtpFake(smtpPort, mailDir);
  };
  const stopSmtp = async () => {
    await smtp?.close();
    smtp = null;
  };

  const get = (url: string) => request(stack.url).get(url).set("Cookie", clerk);
  const post = (url: string) => request(stack.url).post(url).set("Cookie", clerk);
  const claimView = async (id: string) => (await get(`/api/claims/${id}`).expect(200)).body as ClaimDetail;
  const newClaim = async () => (await post("/api/claims").send({ kind: "repair", repairLineId: lines.pop() }).expect(201)).body as ClaimDetail;
  const health = async () => (await request(stack.url).get(apiPaths.health())).body as Record<string, string>;
  /** Messages the SMTP fake captured for a claim. */
  const mailFor = async (claimNumber: string) => {
    const files = readdirSync(mailDir).filter((f) => f.endsWith(".eml"));
    const subjects = await Promise.all(files.map(async (f) => (await parseMail(readFileSync(path.join(mailDir, f)))).subject));
    return subjects.filter((s) => s.includes(claimNumber));
  };
  /** The claim's last send once it is sent (or `ms` passed). */
  const sentWithin = async (id: string, ms: number) => {
    let last = (await claimView(id)).lastSend;
    await until(async () => (last = (await claimView(id)).lastSend)?.status === "sent", ms, 500);
    return last;
  };

  beforeAll(async () => {
    s3Port = await freePort();
    smtpPort = await freePort();
    await startS3();
    await startSmtp();
    stack = await startTestStack(
      {
        S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
        S3_BUCKET: bucket,
        S3_ACCESS_KEY_ID: "S3RVER",
        S3_SECRET_ACCESS_KEY: "S3RVER",
        SMTP_HOST: "127.0.0.1",
        SMTP_PORT: String(smtpPort),
      },
      { demo: true },
    );
    clerk = await serviceSessionCookie(stack.pool, loadOrCreateSecrets(stack.dataDir).sessionSecret, { sub: "fault-clerk", name: "Fault Clerk", email: null, roles: ["clerk"], shops: [] }, 1);
    lines = await coveredLines(stack.db, 6);
  }, 600_000);

  afterAll(async () => {
    await stack?.stop();
    await stopSmtp();
    await stopS3();
    rmSync(work, { recursive: true, force: true });
  }, 60_000);

  it("stops answering storage requests with 503 storage_unavailable while the store is down, and serves them again once it is back", async () => {
    const claim = await newClaim();
    const up = (await post(`/api/claims/${claim.id}/attachments`).attach("file", photo, "plug.png").expect(201)).body as ClaimDetail;
    const a = up.attachments[0];
    expect(up.storageAvailable).toBe(true);
    expect(await health()).toEqual({ status: "ok", database: "ok", storage: "ok", mail: "ok" });

    await stopS3();
    expectDependency503(await post(`/api/claims/${claim.id}/attachments`).attach("file", photo, "second.png"), "storage_unavailable", /Object storage .* is not answering, so the file was not saved/);
    expectDependency503(await get(`/api/claims/${claim.id}/attachments/${a.id}`), "storage_unavailable", /Object storage .* is not answering, so the file cannot be read/);
    expectDependency503(await get(`/api/claims/${claim.id}/packet.pdf`), "storage_unavailable", /cannot be put together with its photos/);
    // a send that cannot put its packet together is refused before anything is recorded or mailed
    expectDependency503(await post(`/api/claims/${claim.id}/send`), "storage_unavailable", /Object storage/);
    expect(await stack.db.selectFrom("warranty_send").select("send_id").where("claim_id", "=", claim.id).execute()).toEqual([]);
    const down = await request(stack.url).get(apiPaths.health()).expect(503);
    expect(down.body).toEqual({ status: "unavailable", database: "ok", storage: "unavailable", mail: "ok" });
    expect(JSON.stringify(down.body)).not.toContain(String(s3Port));
    const page = await claimView(claim.id);
    expect(page.storageAvailable).toBe(false);
    expect(page.attachments).toHaveLength(1);
    expect(await stack.db.selectFrom("warranty_attachment").select("original_name").where("claim_id", "=", claim.id).execute()).toEqual([{ original_name: "plug.png" }]);

    await startS3();
    expect(await until(async () => (await health()).storage === "ok", 10_000)).toBe(true);
    expect((await claimView(claim.id)).storageAvailable).toBe(true);
    const back = await get(`/api/claims/${claim.id}/attachments/${a.id}`).responseType("blob").expect(200);
    expect(Buffer.compare(back.body as Buffer, photo)).toBe(0);
    await post(`/api/claims/${claim.id}/attachments`).attach("file", photo, "second.png").expect(201);
    const pdf = await get(`/api/claims/${claim.id}/packet.pdf`).responseType("blob").expect(200);
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe("%PDF-");
    expect(await health()).toEqual({ status: "ok", database: "ok", storage: "ok", mail: "ok" });
  }, 60_000);

  it("queues a packet while the mail server is down, saying so, and delivers it exactly once when the server is back", async () => {
    const claim = await newClaim();
    await stopSmtp();
    expect(await until(async () => (await health()).mail === "unavailable", 10_000)).toBe(true);
    expect(await health()).toEqual({ status: "unavailable", database: "ok", storage: "ok", mail: "unavailable" });

    const queued = (await post(`/api/claims/${claim.id}/send`).expect(202)).body as ClaimDetail;
    expect(queued.lastSend).toMatchObject({ status: "queued", attempts: 1 });
    expect(queued.lastSend!.lastError).toMatch(/^The mail server did not accept a connection \(\w+\)\. The packet is queued/);
    expect(queued.lastSend!.lastError).not.toMatch(/127\.0\.0\.1|storage|database/i);

    await startSmtp();
    const last = await sentWithin(claim.id, 60_000);
    expect(last).toMatchObject({ status: "sent" });
    expect(last!.attempts).toBeGreaterThanOrEqual(2);
    await sleep(2000); // a second delivery would have arrived by now
    expect(await mailFor(claim.claimNumber)).toHaveLength(1);
    expect(await stack.db.selectFrom("warranty_send").select("status").where("claim_id", "=", claim.id).execute()).toEqual([{ status: "sent" }]);
    expect(await health()).toEqual({ status: "ok", database: "ok", storage: "ok", mail: "ok" });
  }, 120_000);

  it("names object storage, not the mail server, when a queued retry cannot put the packet together, and delivers once both are back", async () => {
    const claim = await newClaim();
    await post(`/api/claims/${claim.id}/attachments`).attach("file", photo, "plug.png").expect(201);
    await stopSmtp();
    const queued = (await post(`/api/claims/${claim.id}/send`).expect(202)).body as ClaimDetail;
    expect(queued.lastSend!.lastError).toMatch(/mail server/);

    await stopS3();
    await startSmtp();
    let last = queued.lastSend!;
    const named = await until(async () => /Object storage/.test((last = (await claimView(claim.id)).lastSend!).lastError ?? ""), 30_000, 500);
    expect(named).toBe(true);
    expect(last).toMatchObject({ status: "queued" });
    expect(last.lastError).toMatch(/^Object storage is not answering, so the packet and its photos could not be put together; the mail server was not tried\. It will be tried again\.$/);
    expect(await mailFor(claim.claimNumber)).toHaveLength(0);

    await startS3();
    expect(await sentWithin(claim.id, 60_000)).toMatchObject({ status: "sent" });
    await sleep(2000);
    expect(await mailFor(claim.claimNumber)).toHaveLength(1);
  }, 120_000);
});
