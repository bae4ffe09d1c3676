/** A small reader for the .eml files the SMTP fake captures: headers, text body and attachments. */

export interface MimePart {
  headers: Record<string, string>;
  contentType: string;
  filename: string | null;
  body: Buffer;
}

export interface ParsedMail {
  headers: Record<string, string>;
  subject: string;
  text: string;
  attachments: { filename: string; contentType: string; content: Buffer }[];
}

/** RFC 2047 encoded words (=?utf-8?B?…?= / =?utf-8?Q?…?=) as text. */
export function decodeWords(s: string): string {
  return s
    .replace(/\?=\s+=\?/g, "?==?")
    .replace(/=\?([^?]+)\?([bBqQ])\?([^?]*)\?=/g, (_m, _cs: string, enc: string, data: string) =>
      enc.toUpperCase() === "B"
        ? Buffer.from(data, "base64").toString("utf8")
        : Buffer.from(data.replace(/_/g, " ").replace(/=([0-9A-F]{2})/gi, (_x, h: string) => String.fromCharCode(parseInt(h, 16))), "latin1").toString("utf8"),
    );
}

function splitHead(raw: Buffer): { headers: Record<string, string>; body: Buffer } {
  const text = raw.toString("latin1");
  let cut = text.indexOf("\r\n\r\n");
  let sep = 4;
  if (cut < 0) {
    cut = text.indexOf("\n\n");
    sep = 2;
  }
  const head = cut < 0 ? text : text.slice(0, cut);
  const headers: Record<string, string> = {};
  for (const line of head.replace(/\r?\n[ \t]+/g, " ").split(/\r?\n/)) {
    const i = line.indexOf(":");
    if (i > 0) headers[line.slice(0, i).trim().toLowerCase()] = line.slice(i + 1).trim();
  }
  return { headers, body: cut < 0 ? Buffer.alloc(0) : raw.subarray(cut + sep) };
}

const param = (header: string | undefined, name: string): string | null => {
  const m = header?.match(new RegExp(`${name}\\*?=(?:"([^"]*)"|([^;\\s]*))`, "i"));
  return m ? decodeWords(m[1] ?? m[2]) : null;
};

function decodeBody(body: Buffer, encoding: string | undefined): Buffer {
  const enc = (encoding ?? "").toLowerCase();
  if (enc === "base64") return Buffer.from(body.toString("latin1").replace(/\s+/g, ""), "base64");
  if (enc === "quoted-printable") {
    const s = body.toString("latin1").replace(/=\r?\n/g, "");
    return Buffer.from(s.replace(/=([0-9A-F]{2})/gi, (_m, h: string) => String.fromCharCode(parseInt(h, 16))), "latin1");
  }
  return body;
}

/** Leaf parts of a message, depth first. */
export function mimeParts(raw: Buffer): MimePart[] {
  const { headers, body } = splitHead(raw);
  const ct = headers["content-type"] ?? "text/plain";
  const boundary = param(ct, "boundary");
  if (/^multipart\//i.test(ct) && boundary) {
    const text = body.toString("latin1");
    const marker = `--${boundary}`;
    const pieces = text.split(marker).slice(1);
    const out: MimePart[] = [];
    for (const p of pieces) {
      if (p.startsWith("--")) break;
      out.push(...mimeParts(Buffer.from(p.replace(/^\r?\n/, "").replace(/\r?\n$/, ""), "latin1")));
    }
    return out;
  }
  const disposition = headers["content-disposition"];
  return [{ headers, contentType: ct.split(";")[0].trim().toLowerCase(), filename: param(disposition, "filename") ?? param(ct, "name"), body: decodeBody(body, headers["content-transfer-encoding"]) }];
}

export function parseMail(raw: Buffer | string): ParsedMail {
  const buf = typeof raw === "string" ? Buffer.from(raw, "utf8") : raw;
  const { headers } = splitHead(buf);
  const parts = mimeParts(buf);
  const text = parts.find((p) => p.contentType === "text/plain" && !p.filename);
  return {
    headers,
    subject: decodeWords(headers["subject"] ?? ""),
    text: text ? text.body.toString("utf8") : "",
    attachments: parts.filter((p) => p.filename).map((p) => ({ filename: p.filename!, contentType: p.contentType, content: p.body })),
  };
}
