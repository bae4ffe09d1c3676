/** Reads a raw message with mailparser, for tests that check what the SMTP fake captured or nodemailer built. */
import { simpleParser } from "mailparser";

export interface ReadMail {
  /** top-level headers by lower-case name, unfolded, values as written */
  headers: Record<string, string>;
  subject: string;
  text: string;
  attachments: { filename: string; contentType: string; content: Buffer }[];
}

/** The message's headers, subject, text body and named attachments. */
export async function parseMail(raw: Buffer | string): Promise<ReadMail> {
  const m = await simpleParser(typeof raw === "string" ? Buffer.from(raw, "utf8") : raw);
  return {
    // raw header text from headerLines: mailparser's own header map holds parsed values (address objects), not the text
    headers: Object.fromEntries(m.headerLines.map((h) => [h.key, h.line.slice(h.line.indexOf(":") + 1).replace(/\r?\n[ \t]+/g, " ").trim()])),
    subject: m.subject ?? "",
    text: m.text ?? "",
    attachments: m.attachments.filter((a) => a.filename).map((a) => ({ filename: a.filename!, contentType: a.contentType, content: a.content })),
  };
}

/** RFC 2047 encoded words (=?utf-8?B?…?=, =?utf-8?Q?…?=) as text, decoded by mailparser as a subject. */
export async function decodeWords(header: string): Promise<string> {
  return (await parseMail(`Subject: ${header}\r\n\r\n`)).subject;
}
