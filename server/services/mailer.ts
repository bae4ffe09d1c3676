import nodemailer from "nodemailer";

/** A reachability answer is reused this long, so the health check does not open an SMTP session per call. */
const PROBE_TTL_MS = 2000;

/** Mail over SMTP (nodemailer); locally the loopback SMTP fake, which offers no TLS. */
export function createMailer(host: string, port: number, from: string) {
  const loopback = host === "127.0.0.1" || host === "localhost";
  const transport = nodemailer.createTransport({
    host,
    port,
    secure: false,
    ignoreTLS: loopback,
    // a server that does not answer is known in seconds (nodemailer waits two minutes by default), so a send
    // request is answered and queued promptly
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
  });
  let known: { ok: boolean; at: number } | null = null;
  let probing: Promise<boolean> | null = null;
  return {
    transport,
    from,
    /**
     * Whether the mail server takes a connection and greets (nodemailer's verify: connect, EHLO, QUIT), from a
     * probe at most PROBE_TTL_MS old; never throws. An arrow so callers may pass it on unbound.
     */
    available: async (): Promise<boolean> => {
      if (known && Date.now() - known.at < PROBE_TTL_MS) return known.ok;
      probing ??= transport
        .verify()
        .then(
          () => true,
          () => false,
        )
        .then((ok) => {
          known = { ok, at: Date.now() };
          return ok;
        })
        .finally(() => {
          probing = null;
        });
      return await probing;
    },
  };
}
export type Mailer = ReturnType<typeof createMailer>;
