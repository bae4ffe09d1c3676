import { describe, expect, it } from "vitest";
import nodemailer, { type SendMailOptions } from "nodemailer";
import { decodeWords, parseMail } from "../../helpers/read-mail.js";

/** The raw message nodemailer would put on the wire, built without a server (stream transport). */
async function build(message: SendMailOptions): Promise<Buffer> {
  const t = nodemailer.createTransport({ streamTransport: true, buffer: true });
  const info = await t.sendMail(message);
  return info.message as Buffer;
}

describe("parseMail(raw)", () => {
  it("reads the subject, the text body and a PDF attachment's bytes from a nodemailer message", async () => {
    const pdf = Buffer.from("%PDF-1.4\n% test bytes \u00ff\n", "latin1");
    const raw = await build({
      from: "no-reply@ironledger.invalid",
      to: "claims-k26@warranty.ironledger.invalid",
      subject: "Warranty claim IL-26C00001: lot BT-2109 – 85 failures at −18 °C",
      text: "The packet is attached.",
      attachments: [
        { filename: "IL-26C00001.pdf", content: pdf, contentType: "application/pdf" },
        { filename: "IL-26C00001-lines.csv", content: "a,b\r\n1,2\r\n", contentType: "text/csv" },
      ],
    });
    const m = await parseMail(raw);
    expect(m.subject).toBe("Warranty claim IL-26C00001: lot BT-2109 – 85 failures at −18 °C");
    expect(m.text.trim()).toBe("The packet is attached.");
    expect(m.attachments.map((a) => [a.filename, a.contentType])).toEqual([
      ["IL-26C00001.pdf", "application/pdf"],
      ["IL-26C00001-lines.csv", "text/csv"],
    ]);
    expect(Buffer.compare(m.attachments[0].content, pdf)).toBe(0);
    expect(m.headers["to"]).toBe("claims-k26@warranty.ironledger.invalid");
  });
});

describe("decodeWords(header)", () => {
  it("decodes base64 and quoted-printable encoded words and joins adjacent ones", async () => {
    expect(await decodeWords("=?UTF-8?B?wrBG?=")).toBe("°F");
    expect(await decodeWords("=?UTF-8?Q?caf=C3=A9_au?= =?UTF-8?Q?_lait?=")).toBe("café au lait");
  });
});
