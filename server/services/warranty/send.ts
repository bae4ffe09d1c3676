/**
 * Sending claim packets by mail: the packet is rendered afresh and handed to the mail server; a send the
 * server does not take is retried through pg-boss.
 */
import type PgBoss from "pg-boss";
import type { Db } from "../../db/database.js";
import type { Mailer } from "../mailer.js";
import type { Storage } from "../storage.js";
import { logger } from "../../logger.js";
import { getSend, insertSend, recordSendAttempt, type Actor } from "../../db/queries/claims.js";
import type { ClaimDetail } from "../../../shared/schemas/claims.js";
import { HttpError, isDatabaseUnreachable, mailUnavailable } from "../../errors.js";
import { claimDetail, packetPdf } from "./claims-service.js";
import { claimLinesCsv } from "./lines-csv.js";
import { readSettings } from "../../db/queries/settings.js";

export const SEND_QUEUE = "claim-packet-send";

export interface SendDeps {
  db: Db;
  mailer: Mailer;
  storage?: Storage;
  /** the retry queue; without it a failed send is marked failed and waits for the clerk to send again */
  boss?: PgBoss | null;
}

/** Retry plan for a send the mail server did not take: every few seconds at first, then backing off. */
export const RETRY = { retryLimit: 12, retryDelay: 3, retryBackoff: true } as const;

/** The mail server's own failure, kept apart from failures to put the packet together (database, storage). */
export class MailServerError extends Error {
  constructor(readonly mailError: unknown) {
    super("the mail server did not take the message");
    this.name = "MailServerError";
  }
}

/** A mail server failure in words: what happened, never where (no host or port), without the stack. */
export function describeMailError(err: unknown): string {
  const e = err as { code?: string; message?: string; responseCode?: number };
  if (e?.code === "ECONNREFUSED" || e?.code === "ESOCKET" || e?.code === "ECONNECTION" || e?.code === "EDNS")
    return `The mail server did not accept a connection (${e.code}).`;
  if (e?.code === "ETIMEDOUT") return "The mail server did not answer in time (ETIMEDOUT).";
  // the server's own reply (e.g. a refused recipient) helps the clerk; it names no host of ours
  if (e?.responseCode) return `The mail server refused the message (${e.responseCode}): ${e.message ?? ""}`.trim();
  return `The mail server did not take the message${e?.code ? ` (${e.code})` : ""}.`;
}

/**
 * Why a send did not go, naming the dependency that failed: the mail server, or object storage or the
 * database while the packet was being put together (the mail server is then not tried at all).
 */
export function describeSendError(err: unknown): string {
  if (err instanceof MailServerError) return describeMailError(err.mailError);
  if (err instanceof HttpError && err.code === "storage_unavailable")
    return "Object storage is not answering, so the packet and its photos could not be put together; the mail server was not tried.";
  if ((err instanceof HttpError && err.code === "database_unavailable") || isDatabaseUnreachable(err))
    return "The warehouse database is not answering, so the packet could not be put together; the mail server was not tried.";
  return "The packet could not be put together on the server (not a mail server problem); the server log has the details.";
}

/** The packet mail for a claim: PDF and lines CSV rendered afresh (reads the database and object storage). */
async function packetMail(deps: Pick<SendDeps, "db" | "storage">, detail: ClaimDetail, from: string, to: string, requestedBy: string) {
  const pdf = await packetPdf(deps, detail);
  const csv = claimLinesCsv(detail.claimNumber, detail.lines, (await readSettings(deps.db)).currency);
  return {
    from,
    to,
    subject: `Warranty claim ${detail.claimNumber}: ${detail.title}`,
    text: [
      `Warranty claim ${detail.claimNumber} (${detail.kind === "campaign" ? "campaign case" : "repair claim"}), ${detail.lineCount} repair line${detail.lineCount === 1 ? "" : "s"}.`,
      `Engine family ${detail.engineFamily}${detail.shopCode ? `, shop ${detail.shopCode}` : ""}.`,
      `Filing: ${detail.deadline.text}`,
      "",
      "The claim packet (PDF) and the claim lines (CSV) are attached.",
      `Sent by Ironledger on behalf of ${requestedBy}.`,
    ].join("\n"),
    attachments: [
      { filename: `${detail.claimNumber}.pdf`, content: pdf, contentType: "application/pdf" },
      { filename: `${detail.claimNumber}-lines.csv`, content: csv, contentType: "text/csv; charset=utf-8" },
    ],
  };
}

/** Hands a message to the mail server; its refusal becomes a MailServerError. Returns the message id. */
async function handOver(mailer: Mailer, message: Awaited<ReturnType<typeof packetMail>>): Promise<string> {
  try {
    return (await mailer.transport.sendMail(message)).messageId;
  } catch (err) {
    throw new MailServerError(err);
  }
}

/** Renders the packet afresh and hands it to the mail server; returns the message id. */
export async function deliver(deps: SendDeps, sendId: string): Promise<string> {
  const s = await getSend(deps.db, sendId);
  if (!s) throw new Error(`send ${sendId} does not exist`);
  // the send was authorised when it was requested; the worker reads the claim group-wide
  const detail = await claimDetail({ db: deps.db, storage: deps.storage, canSend: true }, { kind: "all" }, String(s.claim_id));
  return await handOver(deps.mailer, await packetMail(deps, detail, deps.mailer.from, s.to_address, s.requested_by));
}

/**
 * Puts the packet together, records the send and hands it to the mail server at once. When object storage or
 * the database cannot give the packet, nothing is recorded and the 503 names them. When the mail server does
 * not take it, the send is queued in pg-boss and retried (see RETRY), and the claim shows it as queued with
 * the mail server's error until it goes; without a queue it is recorded as failed and the answer is 503
 * mail_unavailable.
 */
export async function requestSend(deps: SendDeps, claim: ClaimDetail, actor: Actor): Promise<void> {
  const message = await packetMail(deps, claim, deps.mailer.from, claim.warrantyEmail, actor.name);
  const sendId = await insertSend(deps.db, claim.id, claim.warrantyEmail, actor);
  try {
    const messageId = await handOver(deps.mailer, message);
    await recordSendAttempt(deps.db, sendId, { status: "sent", messageId });
  } catch (err) {
    if (!(err instanceof MailServerError)) throw err;
    const error = describeMailError(err.mailError);
    logger.warn({ err: err.mailError, sendId }, "claim packet send failed; queuing a retry");
    if (deps.boss) {
      await recordSendAttempt(deps.db, sendId, { status: "queued", error: `${error} The packet is queued and goes as soon as the mail server takes it.` });
      await deps.boss.send(SEND_QUEUE, { sendId }, RETRY);
    } else {
      await recordSendAttempt(deps.db, sendId, { status: "failed", error: `${error} No retry queue is running here: send it again once mail works.` });
      throw mailUnavailable(`${error} The packet was not sent and no retry queue is running here: send it again once mail works, or download it.`);
    }
  }
}

/** A send asked for on the claim page: refused in words without mail, or while the last send is still pending. */
export async function sendPacket(deps: Omit<SendDeps, "mailer"> & { mailer?: Mailer }, claim: ClaimDetail, actor: Actor): Promise<void> {
  const { mailer } = deps;
  if (!mailer) throw mailUnavailable("Mail is not configured on this server, so the packet cannot be sent from here. Download it instead.");
  const pending = claim.sends.at(-1);
  if (pending && (pending.status === "queued" || pending.status === "sending"))
    throw new HttpError(409, "send_pending", `This packet is already ${pending.status === "queued" ? "queued for a retry" : "being sent"} to ${pending.toAddress}; it will go once the mail server takes it.`);
  await requestSend({ ...deps, mailer }, claim, actor);
}

/**
 * The worker that retries queued sends. A send already sent is skipped (a job may run twice). Sends left
 * queued or half-done by a previous run are queued again at start, so none is lost across a restart.
 */
export async function startSendWorker(deps: SendDeps & { boss: PgBoss }): Promise<void> {
  const { boss, db } = deps;
  await boss.createQueue(SEND_QUEUE);
  await boss.work<{ sendId: string }>(SEND_QUEUE, { includeMetadata: true, pollingIntervalSeconds: 1 }, async (jobs) => {
    for (const job of jobs) {
      const s = await getSend(db, job.data.sendId);
      if (!s || s.status === "sent") continue;
      try {
        const messageId = await deliver(deps, job.data.sendId);
        await recordSendAttempt(db, job.data.sendId, { status: "sent", messageId });
      } catch (err) {
        const last = job.retryCount >= job.retryLimit;
        const why = describeSendError(err);
        await recordSendAttempt(db, job.data.sendId, {
          status: last ? "failed" : "queued",
          error: last ? `${why} Gave up after ${job.retryCount + 1} retries: send it again.` : `${why} It will be tried again.`,
        });
        throw err;
      }
    }
  });
  const stranded = await db
    .selectFrom("warranty_send")
    .select("send_id")
    .where("status", "in", ["queued", "sending"])
    .where("updated_at", "<", new Date(Date.now() - 60_000))
    .execute();
  for (const s of stranded) await boss.send(SEND_QUEUE, { sendId: String(s.send_id) }, RETRY);
}
