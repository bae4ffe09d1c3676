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
import { HttpError } from "../../errors.js";
import { claimDetail, packetPdf } from "./claims-service.js";
import { claimLinesCsv } from "./lines-csv.js";

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

/** A mail failure in words, without the stack. */
export function describeMailError(err: unknown): string {
  const e = err as { code?: string; message?: string; responseCode?: number; address?: string; port?: number };
  if (e?.code === "ECONNREFUSED" || e?.code === "ESOCKET" || e?.code === "ECONNECTION")
    return `The mail server did not accept a connection (${e.code}${e.address ? ` at ${e.address}:${e.port}` : ""}).`;
  if (e?.code === "ETIMEDOUT") return "The mail server did not answer in time (ETIMEDOUT).";
  if (e?.responseCode) return `The mail server refused the message (${e.responseCode}): ${e.message ?? ""}`.trim();
  return `Sending failed: ${e?.message ?? String(err)}`;
}

/** Renders the packet afresh and hands it to the mail server; returns the message id. */
export async function deliver(deps: SendDeps, sendId: string): Promise<string> {
  const s = await getSend(deps.db, sendId);
  if (!s) throw new Error(`send ${sendId} does not exist`);
  // the send was authorised when it was requested; the worker reads the claim group-wide
  const detail = await claimDetail({ db: deps.db, storage: deps.storage, canSend: true }, { kind: "all" }, String(s.claim_id));
  const pdf = await packetPdf(deps, detail);
  const csv = claimLinesCsv(detail.claimNumber, detail.lines);
  const info = await deps.mailer.transport.sendMail({
    from: deps.mailer.from,
    to: s.to_address,
    subject: `Warranty claim ${detail.claimNumber}: ${detail.title}`,
    text: [
      `Warranty claim ${detail.claimNumber} (${detail.kind === "campaign" ? "campaign case" : "repair claim"}), ${detail.lineCount} repair line${detail.lineCount === 1 ? "" : "s"}.`,
      `Engine family ${detail.engineFamily}${detail.shopCode ? `, shop ${detail.shopCode}` : ""}.`,
      `Filing: ${detail.deadline.text}`,
      "",
      "The claim packet (PDF) and the claim lines (CSV) are attached.",
      `Sent by Ironledger on behalf of ${s.requested_by}.`,
    ].join("\n"),
    attachments: [
      { filename: `${detail.claimNumber}.pdf`, content: pdf, contentType: "application/pdf" },
      { filename: `${detail.claimNumber}-lines.csv`, content: csv, contentType: "text/csv; charset=utf-8" },
    ],
  });
  return info.messageId;
}

/**
 * Records a send and tries it at once. When the mail server does not take it, the send is queued in
 * pg-boss and retried (see RETRY); the claim shows it as queued with the last error until it goes.
 */
export async function requestSend(deps: SendDeps, claimId: string, toAddress: string, actor: Actor): Promise<void> {
  const sendId = await insertSend(deps.db, claimId, toAddress, actor);
  try {
    const messageId = await deliver(deps, sendId);
    await recordSendAttempt(deps.db, sendId, { status: "sent", messageId });
  } catch (err) {
    const error = describeMailError(err);
    logger.warn({ err, sendId }, "claim packet send failed; queuing a retry");
    if (deps.boss) {
      await recordSendAttempt(deps.db, sendId, { status: "queued", error });
      await deps.boss.send(SEND_QUEUE, { sendId }, RETRY);
    } else {
      await recordSendAttempt(deps.db, sendId, { status: "failed", error: `${error} No retry queue is running here: send it again once mail works.` });
    }
  }
}

/** A send asked for on the claim page: refused in words without mail, or while the last send is still pending. */
export async function sendPacket(deps: Omit<SendDeps, "mailer"> & { mailer?: Mailer }, claim: ClaimDetail, actor: Actor): Promise<void> {
  const { mailer } = deps;
  if (!mailer) throw new HttpError(503, "mail_unavailable", "Mail is not configured on this server, so the packet cannot be sent from here. Download it instead.");
  const pending = claim.sends.at(-1);
  if (pending && (pending.status === "queued" || pending.status === "sending"))
    throw new HttpError(409, "send_pending", `This packet is already ${pending.status === "queued" ? "queued for a retry" : "being sent"} to ${pending.toAddress}; it will go once the mail server takes it.`);
  await requestSend({ ...deps, mailer }, claim.id, claim.warrantyEmail, actor);
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
        await recordSendAttempt(db, job.data.sendId, {
          status: last ? "failed" : "queued",
          error: last ? `${describeMailError(err)} Gave up after ${job.retryCount + 1} retries: send it again.` : describeMailError(err),
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
