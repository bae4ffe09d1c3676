import { SMTPServer } from "smtp-server";
import { mkdirSync, writeFileSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";

export interface CapturedMail {
  id: string;
  from: string;
  to: string[];
  receivedAt: string;
  raw: string;
}

/**
 * A loopback SMTP server that accepts every message and keeps it as an .eml file in `dir`.
 * Stands in for the real mail relay in development and tests.
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
        const meta = {
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
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** Reads what the fake captured, newest first. */
export function listCapturedMail(dir: string): CapturedMail[] {
  let files: string[] = [];
  try {
    files = readdirSync(dir).filter((f) => f.endsWith(".json"));
  } catch {
    return [];
  }
  return files
    .sort()
    .reverse()
    .map((f) => {
      const meta = JSON.parse(readFileSync(path.join(dir, f), "utf8")) as Omit<CapturedMail, "raw">;
      return { ...meta, raw: readFileSync(path.join(dir, f.replace(/\.json$/, ".eml")), "utf8") };
    });
}
