import { mkdtempSync, readFileSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "kysely";
import { simpleParser } from "mailparser";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import { digestApiPath, digestPageSchema } from "../../shared/schemas/digest.js";
import { upsertUser } from "../../server/db/queries/users.js";
import { createMailer, type Mailer } from "../../server/services/mailer.js";
import { startSmtpFake } from "../../server/dev/smtp-fake.js";
import PgBoss from "pg-boss";
import { DIGEST_QUEUE, runDigests, startDigestSchedule } from "../../server/services/digest/digest.js";
import { parseMail } from "../helpers/read-mail.js";
import { freePort } from "../helpers/test-stack.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import type { Role } from "../../shared/roles.js";

// The weekly digest on the demo world (history to 2025-06-30): the job is run for given days, the mail the SMTP
// fake captured is read back, and each reader's digest holds only what their pages would show them. A shop
// manager's digest must hold no other shop's code or name, in the text part nor the HTML part (the same rule as
// the access matrix: OWASP Authorization Cheat Sheet, "validate permissions on every request"; common
// practice, no further source). 2025-07-07 is a Monday, 2025-07-09 a Wednesday (ISO 8601 week 28 of 2025).

const ORIGIN = "http://127.0.0.1:8080";
const MONDAY = "2025-07-07";
const WEDNESDAY = "2025-07-09";
const NEXT_MONDAY = "2025-07-14";
const OWN = "S3";

let t: TestApp;
let smtp: Awaited<ReturnType<typeof startSmtpFake>>;
let mailer: Mailer;
let mailDir: string;
let shops: { code: string; name: string }[];
const seen = new Set<string>();

interface Got {
  to: string[];
  subject: string;
  text: string;
  html: string;
  from: string;
}

/** Mail captured since the last call, read with the shared reader (and mailparser for the HTML part). */
async function newMail(): Promise<Got[]> {
  const out: Got[] = [];
  for (const f of readdirSync(mailDir).filter((x) => x.endsWith(".eml")).sort()) {
    if (seen.has(f)) continue;
    seen.add(f);
    const raw = readFileSync(path.join(mailDir, f));
    const meta = JSON.parse(readFileSync(path.join(mailDir, f.replace(/\.eml$/, ".json")), "utf8")) as { to: string[] };
    const m = await parseMail(raw);
    out.push({ to: meta.to, subject: m.subject, text: m.text, html: String((await simpleParser(raw)).html || ""), from: m.headers.from ?? "" });
  }
  return out;
}
const to = (mail: Got[], address: string) => mail.filter((m) => m.to.includes(address));
const run = (date: string) => runDigests({ db: t.db, mailer, publicUrl: ORIGIN }, date);

const users: Record<string, { sub: string; email: string | null; roles: Role[]; shops: string[] }> = {
  analyst: { sub: "digest-analyst", email: "analyst@digest.invalid", roles: ["analyst"], shops: [] },
  director: { sub: "digest-director", email: "director@digest.invalid", roles: ["director"], shops: [] },
  manager: { sub: "digest-manager", email: "manager@digest.invalid", roles: ["manager"], shops: [OWN] },
  off: { sub: "digest-off", email: "off@digest.invalid", roles: ["manager"], shops: [OWN] },
  wednesday: { sub: "digest-wednesday", email: "wednesday@digest.invalid", roles: ["analyst"], shops: [] },
  gone: { sub: "digest-gone", email: "gone@digest.invalid", roles: ["analyst"], shops: [] },
  silent: { sub: "digest-silent", email: null, roles: ["analyst"], shops: [] },
};

beforeAll(async () => {
  t = await testApp({ demo: true });
  mailDir = mkdtempSync(path.join(tmpdir(), "ironledger-digest-"));
  const port = await freePort();
  smtp = await startSmtpFake(port, mailDir);
  mailer = createMailer("127.0.0.1", port, "digest@ironledger.invalid");
  for (const [k, u] of Object.entries(users)) await upsertUser(t.db, { sub: u.sub, name: `Digest ${k}`, email: u.email, roles: u.roles, shops: u.shops });
  await t.db.updateTable("app_user").set({ deactivated_at: new Date(), deactivated_by: "Test Admin" }).where("sub", "=", users.gone.sub).execute();
  shops = await t.db.selectFrom("dim_shop").select(["shop_code as code", "name"]).orderBy("shop_code").execute();
  // the group-wide scan records the findings' states, as the answer warmer does after a load
  const analyst = await t.signInAs({ roles: ["analyst"] });
  await request(t.app).get(apiPaths.clusters("")).set("Cookie", analyst).expect(200);
}, 600_000);
afterAll(async () => {
  mailer?.transport.close();
  await smtp?.close();
  await t?.drop();
  if (mailDir) rmSync(mailDir, { recursive: true, force: true });
});

const cookieOf = (u: (typeof users)[string]) => t.signInAs({ sub: u.sub, roles: u.roles, shops: u.shops, name: "Digest user" });

describe("PUT /api/digest", () => {
  it("stores the user's own choice and answers with it", async () => {
    const cookie = await cookieOf(users.off);
    const res = await request(t.app).put(digestApiPath).set("Cookie", cookie).set("Origin", ORIGIN).send({ enabled: false, weekday: 1 }).expect(200);
    expect(digestPageSchema.parse(res.body).preference).toEqual({ enabled: false, weekday: 1 });
    const w = await request(t.app).put(digestApiPath).set("Cookie", await cookieOf(users.wednesday)).set("Origin", ORIGIN).send({ enabled: true, weekday: 3 }).expect(200);
    expect(w.body.preference).toEqual({ enabled: true, weekday: 3 });
  });

  it("refuses a day outside Monday to Sunday in words and changes nothing", async () => {
    const cookie = await cookieOf(users.off);
    const res = await request(t.app).put(digestApiPath).set("Cookie", cookie).set("Origin", ORIGIN).send({ enabled: "yes", weekday: 9 }).expect(400);
    expect(res.body.error.message).toMatch(/^Nothing was changed: .*yes or no.*weekday from 1 \(Monday\) to 7 \(Sunday\)/);
    expect(res.body.error.message).not.toMatch(/relation|column|violates|syntax/i);
    expect((await request(t.app).get(digestApiPath).set("Cookie", cookie).expect(200)).body.preference).toEqual({ enabled: false, weekday: 1 });
  });

  it("refuses a request from another site", async () => {
    await request(t.app).put(digestApiPath).set("Cookie", await cookieOf(users.off)).set("Origin", "https://elsewhere.invalid").send({ enabled: true, weekday: 1 }).expect(403);
  });
});

describe("runDigests(deps, date)", () => {
  let monday: Got[];
  beforeAll(async () => {
    const r = await run(MONDAY);
    monday = await newMail();
    expect(r).toMatchObject({ week: "2025-W28", sent: 3, failed: 0 });
  }, 300_000);

  it("sends Monday's digest to those due on Monday only: not to a user who turned it off, chose Wednesday, is deactivated or has no address", () => {
    expect(monday.flatMap((m) => m.to).sort()).toEqual([users.analyst.email, users.director.email, users.manager.email].sort());
  });

  it("sends a plain-text and an HTML part, from the mail-from address, with the week in the subject", () => {
    for (const m of monday) {
      expect(m.subject).toBe("Ironledger weekly digest, week 28, 7–13 July 2025");
      expect(m.from).toContain("digest@ironledger.invalid");
      expect(m.text.length).toBeGreaterThan(100);
      expect(m.html).toMatch(/^<!doctype html>/);
      expect(m.text).toMatch(/maker's service manual, local codes and licensed practice/);
    }
  });

  it("gives an analyst the findings with their state and the shops outside their limits, linked absolutely", async () => {
    const [m] = to(monday, users.analyst.email!);
    const states = (await sql<{ description: string }>`SELECT description FROM finding_state ORDER BY changed_at DESC`.execute(t.db)).rows;
    expect(states.length).toBeGreaterThan(0);
    expect(m.text).toContain("FINDINGS NEW OR CHANGED SINCE YOUR LAST DIGEST");
    expect(m.text).toContain(`- New (status new): ${states[0].description}`);
    expect(m.text).toContain("SHOPS OUTSIDE THEIR BENCHMARK LIMITS");
    expect(m.text).toContain(`Open the findings: ${ORIGIN}/clusters`);
    expect(m.html).toContain(`href="${ORIGIN}/benchmarks"`);
    expect(m.text).not.toContain("CLAIMS AND LINES DUE");
  });

  it("gives a director the group-wide count of claims and lines near their deadline, with no claim page they cannot open", () => {
    const [m] = to(monday, users.director.email!);
    expect(m.text).toMatch(/CLAIMS AND LINES DUE IN THE NEXT 14 DAYS \(GROUP-WIDE\)\n- \d+ draft claims? and \d+ unclaimed repair lines? inside cover/);
    expect(m.text).not.toContain(`${ORIGIN}/claims`);
  });

  it("gives a shop manager their own shop against the group and its lines near the deadline, and no other shop's code or name", () => {
    const [m] = to(monday, users.manager.email!);
    const own = shops.find((s) => s.code === OWN)!;
    expect(m.text).toContain("YOUR SHOP AGAINST THE GROUP");
    expect(m.text).toMatch(new RegExp(`\\b${OWN}\\b`));
    expect(m.text).toMatch(/Repair order \S+ line \d+ \(S3\): not claimed, deadline 2025-07-(0[7-9]|1\d|2[01]), (due today|\d+ days? left)\./);
    expect(m.text).not.toContain("FINDINGS");
    // the winter forecast of their own shop: the same figures the winter-readiness page gives them
    expect(m.text).toMatch(/WINTER FORECAST AND STOCK GAPS, .+\n- [\d.,]+ cold-start part failures expected over the period at shop S3\./);
    expect(m.text).toMatch(new RegExp(`S3 [^\n]+: [\\d.,]+ expected \\(90 % interval \\d+–\\d+\\); hold \\d+, on hand not entered, short by \\d+; order`));
    expect(m.html).toContain(`href="${ORIGIN}/winter"`);
    for (const other of shops.filter((s) => s.code !== OWN)) {
      for (const part of [m.text, m.html, m.subject]) {
        expect(part).not.toMatch(new RegExp(`\\b${other.code}\\b`));
        expect(part).not.toContain(other.name);
      }
    }
  });

  it("sends nothing more when run again the same day or later the same week", async () => {
    expect(await run(MONDAY)).toMatchObject({ sent: 0, failed: 0 });
    expect(await run("2025-07-08")).toMatchObject({ sent: 0, failed: 0 });
    expect(await newMail()).toEqual([]);
    const sent = await t.db.selectFrom("digest_sent").select(["sub", "week"]).where("week", "=", "2025-W28").execute();
    expect(sent.map((s) => s.sub).sort()).toEqual([users.analyst.sub, users.director.sub, users.manager.sub].sort());
  });

  it("sends on the weekday the user chose", async () => {
    expect(await run(WEDNESDAY)).toMatchObject({ sent: 1 });
    expect((await newMail()).flatMap((m) => m.to)).toEqual([users.wednesday.email]);
  });

  it("catches up a digest whose day passed without a run, later the same week", async () => {
    await upsertUser(t.db, { sub: "digest-late", name: "Digest late", email: "late@digest.invalid", roles: ["director"], shops: [] });
    expect(await run("2025-07-10")).toMatchObject({ sent: 1 });
    expect((await newMail()).flatMap((m) => m.to)).toEqual(["late@digest.invalid"]);
  });

  it("counts changes from the last digest sent: the next week's findings say nothing changed", async () => {
    await run(NEXT_MONDAY);
    const next = await newMail();
    const [m] = to(next, users.analyst.email!);
    expect(m.subject).toContain("week 29");
    expect(m.text).toContain("No finding was found or changed since your last digest.");
    expect(to(next, users.off.email!)).toEqual([]);
    expect(to(next, users.gone.email!)).toEqual([]);
  });
});

describe("GET /api/digest", () => {
  it("shows a manager this week's digest for their shop only, with the choice and the address", async () => {
    const res = await request(t.app).get(digestApiPath).set("Cookie", await cookieOf(users.manager)).expect(200);
    const page = digestPageSchema.parse(res.body);
    expect(page.preference).toEqual({ enabled: true, weekday: 1 });
    expect(page.lastSent?.week).toBe("2025-W29");
    expect(page.preview.sections.map((s) => s.key)).toEqual(["shop-position", "winter", "deadlines"]);
    const body = JSON.stringify(page.preview);
    for (const other of shops.filter((s) => s.code !== OWN)) {
      expect(body).not.toMatch(new RegExp(`\\b${other.code}\\b`));
      expect(body).not.toContain(other.name);
    }
  });
});

describe("startDigestSchedule(deps)", () => {
  it("schedules the run in pg-boss every day at 06:00 UTC", async () => {
    const boss = new PgBoss({ connectionString: t.url, max: 2 });
    await boss.start();
    try {
      await startDigestSchedule({ db: t.db, mailer, publicUrl: ORIGIN, boss });
      const s = (await boss.getSchedules()).filter((x) => x.name === DIGEST_QUEUE);
      expect(s).toHaveLength(1);
      expect(s[0].cron).toBe("0 6 * * *");
      expect(JSON.stringify(s[0].options ?? {})).toContain('"tz":"UTC"');
    } finally {
      await boss.stop({ graceful: false, wait: true, timeout: 5000 });
    }
  });
});
