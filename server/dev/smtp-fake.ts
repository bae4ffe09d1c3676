import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import { mkdirSync, writeFileSync } from "node:fs";
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import type { CapturedMail, MailArchive } from "../services/mail-archive.js";

/** The envelope the fake keeps beside each message: `<id>.json` next to `<id>.eml`. */
type Envelope = Pick<CapturedMail, "id" | "from" | "to" | "receivedAt">;

/**
 * A loopback SMTP server that accepts every message and keeps it as an .eml file in `dir`, with the archive
 * that lists what it captured. Stands in for the real mail relay in development and tests.
 */
export async function startSmtpFake(port: number, dir: string) {
  mkdirSync(dir, { recursive: true });
  let seq = 0;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", () => {
        const id = `${Date.now()}-${String(++seq).padStart(4, "0")}`;
        const meta: Envelope = {
          id,
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
          to: session.envelope.rcptTo.map((r) => r.address),
          receivedAt: new Date().toISOString(),
        };
        writeFileSync(path.join(dir, `${id}.eml`), Buffer.concat(chunks));
        writeFileSync(path.join(dir, `${id}.json`), JSON.stringify(meta));
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  return {
    port,
    dir,
    archive: capturedMailArchive(dir),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** What the fake keeps in `dir`, newest first, each message read with mailparser. */
function capturedMailArchive(dir: string): MailArchive {
  return {
    async list(limit) {
      let files: string[];
      try {
        files = (await readdir(dir)).filter((f) => f.endsWith(".json"));
      } catch {
        return [];
      }
      const mail: CapturedMail[] = [];
      for (const f of files.sort().reverse().slice(0, limit)) {
        const meta = JSON.parse(await readFile(path.join(dir, f), "utf8")) as Envelope;
        const m = await simpleParser(await readFile(path.join(dir, f.replace(/\.json$/, ".eml"))));
        mail.push({
          id: meta.id,
          from: meta.from,
          to: meta.to,
          subject: m.subject ?? "",
          receivedAt: meta.receivedAt,
          text: m.text ?? "",
          attachments: m.attachments
            .filter((a) => a.filename)
            .map((a) => ({ filename: a.filename!, contentType: a.contentType, sizeBytes: a.content.length })),
        });
      }
      return mail;
    },
  };
}
