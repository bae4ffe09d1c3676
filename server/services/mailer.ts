import nodemailer from "nodemailer";

/** Mail over SMTP (nodemailer); locally the loopback SMTP fake, which offers no TLS. */
export function createMailer(host: string, port: number, from: string) {
  const loopback = host === "127.0.0.1" || host === "localhost";
  const transport = nodemailer.createTransport({ host, port, secure: false, ignoreTLS: loopback });
  return { transport, from };
}
export type Mailer = ReturnType<typeof createMailer>;
