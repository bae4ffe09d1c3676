import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createHmac, randomBytes } from "node:crypto";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { crc32, deflateSync } from "node:zlib";
import { sql } from "kysely";
import { freePort, startTestStack, type TestStack } from "../helpers/test-stack.js";
import { loadOrCreateSecrets } from "../../server/secrets.js";
import { startSmtpFake } from "../../server/dev/smtp-fake.js";
import { parseMail } from "../helpers/read-mail.js";
import type { Role } from "../../shared/roles.js";
import type { ClaimDetail } from "../../shared/schemas/claims.js";

// Sending claim packets through the whole product: the S3 fake keeps attachments, nodemailer hands the
// packet to SMTP, and pg-boss retries a send the mail server did not take.

const work = mkdtempSync(path.join(tmpdir(), "ironledger-send-"));

/** A session cookie for the stack, stored the way express-session stores it and signed with the stack's secret. */
async function cookieFor(stack: TestStack, user: { roles: Role[]; shops?: string[]; name: string }): Promise<string> {
  const sid = randomBytes(16).toString("hex");
  const expires = new Date(Date.now() + 3600_000);
  const sess = { cookie: { originalMaxAge: 3600_000, expires: expires.toISOString(), httpOnly: true, path: "/", sameSite: "lax" }, user: { sub: `u-${sid.slice(0, 6)}`, email: null, shops: [], ...user } };
  await stack.db.insertInto("app_session").values({ sid, sess: JSON.stringify(sess), expire: expires }).execute();
  const mac = createHmac("sha256", loadOrCreateSecrets(stack.dataDir).sessionSecret).update(sid).digest("base64").replace(/=+$/, "");
  return `ironledger.sid=${encodeURIComponent(`s:${sid}.${mac}`)}`;
}

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

function pdfText(buf: Buffer): string {
  const file = path.join(work, `m-${randomBytes(4).toString("hex")}.pdf`);
  writeFileSync(file, buf);
  return execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
}

/** A closed, covered heater-plug line with compression readings (engine cover 36 months / 3,000 h in the demo world). */
async function coveredLine(stack: TestStack): Promise<{ key: string; serial: string }> {
  const r = await sql<{ key: string; serial: string }>`
    SELECT fl.repair_line_key::text AS key, m.serial FROM fact_repair_line fl
    JOIN dim_machine m USING (machine_key) JOIN dim_component c USING (component_key)
    WHERE c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL AND fl.hour_meter <= 3000
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      AND EXISTS (SELECT 1 FROM fact_measurement x WHERE x.repair_line_key = fl.repair_line_key AND x.kind = 'compression')
    ORDER BY fl.repair_line_key DESC LIMIT 1`.execute(stack.db);
  return r.rows[0];
}

const emlFiles = (dir: string) => readdirSync(dir).filter((f) => f.endsWith(".eml")).sort();

describe("claims on the whole stack with the SMTP fake", () => {
  let stack: TestStack;
  let clerk: string;
  let claim: ClaimDetail;
  let serial: string;
  beforeAll(async () => {
    stack = await startTestStack({}, { demo: true });
    clerk = await cookieFor(stack, { roles: ["clerk"], name: "Send Clerk" });
    const line = await coveredLine(stack);
    serial = line.serial;
    claim = (await request(stack.url).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: line.key }).expect(201)).body;
  }, 600_000);
  afterAll(async () => {
    await stack?.stop();
  });

  it("keeps an uploaded photo in object storage, typed by its content, and serves it back only inside the claim's scope", async () => {
    const photo = png(64, 48, [180, 60, 20]);
    const res = await request(stack.url).post(`/api/claims/${claim.id}/attachments`).set("Cookie", clerk).attach("file", photo, { filename: "failed-plug.png", contentType: "application/octet-stream" }).expect(201);
    const a = (res.body as ClaimDetail).attachments[0];
    expect(a).toMatchObject({ originalName: "failed-plug.png", contentType: "image/png", extension: "png", sizeBytes: photo.length, isImage: true });
    const back = await request(stack.url).get(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", clerk).responseType("blob").expect(200);
    expect(back.headers["content-type"]).toBe("image/png");
    expect(Buffer.compare(back.body as Buffer, photo)).toBe(0);
    const other = await cookieFor(stack, { roles: ["manager"], shops: [claim.shopCode === "S8" ? "S7" : "S8"], name: "Other Manager" });
    await request(stack.url).get(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", other).expect(404);
    expect((res.body as ClaimDetail).audit.at(-1)).toMatchObject({ action: "attachment added", actorName: "Send Clerk" });
  });

  it("refuses a file whose content is not a photo or PDF, whatever its name, and saves nothing", async () => {
    const r = await request(stack.url).post(`/api/claims/${claim.id}/attachments`).set("Cookie", clerk).attach("file", Buffer.from("just some text, not a picture\n"), "readings.png").expect(415);
    expect(r.body.error.message).toMatch(/Only photos .* can be attached; "readings.png" is not a file type Ironledger recognises/);
    const big = await request(stack.url).post(`/api/claims/${claim.id}/attachments`).set("Cookie", clerk).attach("file", Buffer.alloc(9 * 1024 * 1024, 1), "huge.jpg").expect(413);
    expect(big.body.error.message).toMatch(/larger than 8 MB/);
    const rows = await stack.db.selectFrom("warranty_attachment").select("original_name").where("claim_id", "=", claim.id).execute();
    expect(rows.map((x) => x.original_name)).toEqual(["failed-plug.png"]);
  });

  it("removes a wrong photo before sending: its record, its object in storage and its place in the packet, with the removal audited", async () => {
    const wrong = png(32, 32, [20, 20, 200]);
    const added = (await request(stack.url).post(`/api/claims/${claim.id}/attachments`).set("Cookie", clerk).attach("file", wrong, "wrong-machine.png").expect(201)).body as ClaimDetail;
    const a = added.attachments.find((x) => x.originalName === "wrong-machine.png")!;
    const key = (await stack.db.selectFrom("warranty_attachment").select("s3_key").where("attachment_id", "=", a.id).executeTakeFirstOrThrow()).s3_key;
    const other = await cookieFor(stack, { roles: ["manager"], shops: [claim.shopCode === "S8" ? "S7" : "S8"], name: "Other Manager" });
    await request(stack.url).delete(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", other).set("Origin", stack.url).expect(404);
    await request(stack.url).delete(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", clerk).set("Origin", stack.url).expect(200);
    await request(stack.url).get(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", clerk).expect(404);
    const rows = await stack.db.selectFrom("warranty_attachment").select("original_name").where("claim_id", "=", claim.id).execute();
    expect(rows.map((x) => x.original_name)).toEqual(["failed-plug.png"]);
    // the object is gone from the store too
    await expect(stack.storage!.readObject(key)).rejects.toThrow();
    const after = (await request(stack.url).get(`/api/claims/${claim.id}`).set("Cookie", clerk).expect(200)).body as ClaimDetail;
    expect(after.audit.at(-1)).toMatchObject({ action: "attachment removed", actorName: "Send Clerk", changes: { attachment: "wrong-machine.png" } });
    await request(stack.url).delete(`/api/claims/${claim.id}/attachments/${a.id}`).set("Cookie", clerk).set("Origin", stack.url).expect(404);
  });

  it("e-mails the packet to the engine family's warranty address with the PDF attached", async () => {
    const res = await request(stack.url).post(`/api/claims/${claim.id}/send`).set("Cookie", clerk).expect(200);
    const after = res.body as ClaimDetail;
    expect(after.lastSend).toMatchObject({ status: "sent", attempts: 1, toAddress: after.warrantyEmail });
    const files = emlFiles(stack.mailDir!);
    expect(files).toHaveLength(1);
    const mail = await parseMail(readFileSync(path.join(stack.mailDir!, files[0])));
    expect(mail.headers["to"]).toBe(after.warrantyEmail);
    expect(mail.subject).toContain(`Warranty claim ${claim.claimNumber}`);
    const pdf = mail.attachments.find((x) => x.filename === `${claim.claimNumber}.pdf`)!;
    expect(pdf.contentType).toBe("application/pdf");
    expect(pdf.content.subarray(0, 5).toString()).toBe("%PDF-");
    const text = pdfText(pdf.content);
    expect(text).toContain(serial);
    expect(text).toContain("failed-plug.png");
    expect(mail.attachments.map((x) => x.filename)).toContain(`${claim.claimNumber}-lines.csv`);
    expect(after.audit.map((x) => x.action)).toEqual(expect.arrayContaining(["send requested", "packet sent"]));
  });

  it("lists the captured mail for an admin and for no one else", async () => {
    const admin = await cookieFor(stack, { roles: ["admin"], name: "Mail Admin" });
    const list = (await request(stack.url).get("/api/admin/mail").set("Cookie", admin).expect(200)).body;
    expect(list.mail).toHaveLength(1);
    expect(list.mail[0].subject).toContain(claim.claimNumber);
    expect(list.mail[0].attachments.map((a: { filename: string }) => a.filename)).toContain(`${claim.claimNumber}.pdf`);
    await request(stack.url).get("/api/admin/mail").set("Cookie", clerk).expect(403);
  });
});

describe("a send while the mail server is down", () => {
  let stack: TestStack;
  let smtpPort: number;
  let mailDir: string;
  let smtp: Awaited<ReturnType<typeof startSmtpFake>> | null = null;
  beforeAll(async () => {
    smtpPort = await freePort();
    mailDir = path.join(work, "outside-mail");
    smtp = await startSmtpFake(smtpPort, mailDir);
    stack = await startTestStack({ SMTP_HOST: "127.0.0.1", SMTP_PORT: String(smtpPort) }, { demo: true });
  }, 600_000);
  afterAll(async () => {
    await smtp?.close();
    await stack?.stop();
    rmSync(work, { recursive: true, force: true });
  });

  it("is queued with the error in words, retried, and delivered once the server is back", async () => {
    const clerk = await cookieFor(stack, { roles: ["clerk"], name: "Retry Clerk" });
    const line = await coveredLine(stack);
    const claim = (await request(stack.url).post("/api/claims").set("Cookie", clerk).send({ kind: "repair", repairLineId: line.key }).expect(201)).body as ClaimDetail;
    await smtp!.close();
    smtp = null;
    const queued = (await request(stack.url).post(`/api/claims/${claim.id}/send`).set("Cookie", clerk).expect(202)).body as ClaimDetail;
    expect(queued.lastSend).toMatchObject({ status: "queued", attempts: 1 });
    expect(queued.lastSend!.lastError).toMatch(/did not accept a connection/);
    // a second press while it is queued is refused rather than doubled
    const again = await request(stack.url).post(`/api/claims/${claim.id}/send`).set("Cookie", clerk).expect(409);
    expect(again.body.error.message).toMatch(/already queued for a retry/);
    expect(emlFiles(mailDir)).toHaveLength(0);

    smtp = await startSmtpFake(smtpPort, mailDir);
    let last = queued.lastSend!;
    for (let i = 0; i < 60 && last.status !== "sent"; i++) {
      await new Promise((r) => setTimeout(r, 1000));
      last = ((await request(stack.url).get(`/api/claims/${claim.id}`).set("Cookie", clerk).expect(200)).body as ClaimDetail).lastSend!;
    }
    expect(last.status).toBe("sent");
    expect(last.attempts).toBeGreaterThanOrEqual(2);
    const files = emlFiles(mailDir);
    expect(files).toHaveLength(1);
    const mail = await parseMail(readFileSync(path.join(mailDir, files[0])));
    expect(mail.attachments.find((a) => a.filename === `${claim.claimNumber}.pdf`)?.contentType).toBe("application/pdf");
    const sends = await stack.db.selectFrom("warranty_send").selectAll().where("claim_id", "=", claim.id).execute();
    expect(sends).toHaveLength(1);
  }, 120_000);

  it("has no captured-mail page when a real mail server is configured", async () => {
    const admin = await cookieFor(stack, { roles: ["admin"], name: "Mail Admin" });
    const r = await request(stack.url).get("/api/admin/mail").set("Cookie", admin).expect(404);
    expect(r.body.error.message).toMatch(/only when the local SMTP fake is in use/);
  });
});
