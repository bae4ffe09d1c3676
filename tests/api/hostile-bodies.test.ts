import { gzipSync } from "node:zlib";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { errorEnvelopeSchema } from "../../shared/schemas/error.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

// A request body the server will not read is the caller's mistake: a 4xx in the error envelope, in words,
// never a 500. Statuses as HTTP defines them (RFC 9110: 400 for a body that cannot be read, 413 for content
// larger than the server accepts, 415 for a charset or content coding it does not read).

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
}, 120_000);
afterAll(async () => t?.drop());

const clerk = () => t.signInAs({ roles: ["clerk"] });
/** The claim attachment route: multer reads the form before the claim is looked up, so no claim is needed. */
const attachments = "/api/claims/1/attachments";
const pdf = Buffer.from("%PDF-1.4\n%%EOF\n");
const BOUNDARY = "----ironledger-test-boundary";

type Case = [name: string, send: (cookie: string) => request.Test, status: number, code: string, words: RegExp];

const cases: Case[] = [
  [
    "a form with more fields than the upload reads",
    (c) => {
      let r = request(t.app).post(attachments).set("Cookie", c);
      for (let i = 0; i < 6; i++) r = r.field(`note${i}`, "x");
      return r.attach("file", pdf, "a.pdf");
    },
    400,
    "too_many_fields",
    /more fields than this request accepts/,
  ],
  [
    "a form with two files",
    (c) => request(t.app).post(attachments).set("Cookie", c).attach("file", pdf, "a.pdf").attach("file", pdf, "b.pdf"),
    400,
    "one_file",
    /Send one file in the form field "file"/,
  ],
  [
    "a file in another field",
    (c) => request(t.app).post(attachments).set("Cookie", c).attach("photo", pdf, "a.pdf"),
    400,
    "one_file",
    /Send one file/,
  ],
  [
    "a form field larger than 4 kB",
    (c) => request(t.app).post(attachments).set("Cookie", c).field("note", "x".repeat(5000)).attach("file", pdf, "a.pdf"),
    413,
    "field_too_large",
    /field value in the form is larger/,
  ],
  [
    "a form field name of 200 characters",
    (c) => request(t.app).post(attachments).set("Cookie", c).field("n".repeat(200), "x").attach("file", pdf, "a.pdf"),
    400,
    "field_name_too_long",
    /field name in the form is longer/,
  ],
  [
    "a file larger than 8 MB",
    (c) => request(t.app).post(attachments).set("Cookie", c).attach("file", Buffer.alloc(8 * 1024 * 1024 + 1), "big.pdf"),
    413,
    "too_large",
    /larger than 8 MB/,
  ],
  [
    "a multipart body without a boundary",
    (c) => request(t.app).post(attachments).set("Cookie", c).set("Content-Type", "multipart/form-data").send("whatever"),
    400,
    "malformed_form",
    /could not be read/,
  ],
  [
    "a multipart body cut short",
    (c) =>
      request(t.app)
        .post(attachments)
        .set("Cookie", c)
        .set("Content-Type", `multipart/form-data; boundary=${BOUNDARY}`)
        .send(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="a.pdf"\r\nContent-Type: application/pdf\r\n\r\n%PDF-1.4 and then nothing`),
    400,
    "malformed_form",
    /cut short or its parts are malformed/,
  ],
  [
    "a JSON body in an unsupported charset",
    (c) => request(t.app).post("/api/claims").set("Cookie", c).set("Content-Type", "application/json; charset=latin1").send('{"kind":"repair"}'),
    415,
    "unsupported_charset",
    /character set \(latin1\) is not one Ironledger reads\. Send it as UTF-8/,
  ],
  [
    "a JSON body larger than 1 MB",
    (c) => request(t.app).post("/api/claims").set("Cookie", c).set("Content-Type", "application/json").send(JSON.stringify({ note: "x".repeat(1024 * 1024) })),
    413,
    "too_large",
    /larger than 1 MB/,
  ],
  [
    "a gzip JSON body that inflates beyond 1 MB",
    (c) =>
      request(t.app)
        .post("/api/claims")
        .set("Cookie", c)
        .set("Content-Type", "application/json")
        .set("Content-Encoding", "gzip")
        .serialize((b: Buffer) => b as unknown as string) // the bytes as they are, not the Buffer as JSON
        .send(gzipSync(JSON.stringify({ note: "x".repeat(4 * 1024 * 1024) }))),
    413,
    "too_large",
    /larger than 1 MB/,
  ],
  [
    "a body that is not gzip under Content-Encoding: gzip",
    (c) => request(t.app).post("/api/claims").set("Cookie", c).set("Content-Type", "application/json").set("Content-Encoding", "gzip").send('{"kind":"repair"}'),
    400,
    "invalid_encoding",
    /could not be decompressed/,
  ],
  [
    "a body in a content coding the server does not read",
    (c) => request(t.app).post("/api/claims").set("Cookie", c).set("Content-Type", "application/json").set("Content-Encoding", "compress").send('{"kind":"repair"}'),
    415,
    "unsupported_encoding",
    /content encoding \(compress\) is not one Ironledger reads/,
  ],
  [
    "malformed JSON",
    (c) => request(t.app).post("/api/claims").set("Cookie", c).set("Content-Type", "application/json").send('{"kind": "repair",'),
    400,
    "invalid_json",
    /not valid JSON/,
  ],
  [
    "a sign-out form with more than 1,000 fields",
    (c) =>
      request(t.app)
        .post("/auth/logout")
        .set("Cookie", c)
        .set("Content-Type", "application/x-www-form-urlencoded")
        .send(Array.from({ length: 1001 }, (_, i) => `f${i}=1`).join("&")),
    413,
    "too_many_fields",
    /more fields than Ironledger accepts/,
  ],
];

describe("hostile request bodies", () => {
  for (const [name, send, status, code, words] of cases) {
    it(`answer ${name} with ${status} ${code} in words`, async () => {
      const res = await send(await clerk());
      expect(res.status, JSON.stringify(res.body)).toBe(status);
      const e = errorEnvelopeSchema.parse(res.body).error;
      expect(e.code).toBe(code);
      expect(e.message).toMatch(words);
      expect(e.message).not.toMatch(/Error:|at \/|node_modules|Unexpected token/);
    });
  }
});

describe("POST /api/claims/:id/attachments with a well-formed form", () => {
  it("reaches the route after the form is read (the claim is then looked up)", async () => {
    const res = await request(t.app).post(attachments).set("Cookie", await clerk()).field("note", "ok").attach("file", pdf, "a.pdf");
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe("not_found");
  });
});
