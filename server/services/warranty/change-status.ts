/**
 * Moving a claim to its next state: the rules of status.ts are checked (a submission also for how it went out
 * and how late), then the change is stored with its audit row.
 */
import type { Db } from "../../db/database.js";
import { claimSends, type Actor, type ClaimRow } from "../../db/queries/claims.js";
import { moveClaim, type MoveFields } from "../../db/queries/claim-lifecycle.js";
import type { ClaimStatus, StatusChangeBody } from "../../../shared/schemas/claims.js";
import { todayIso } from "../../../shared/dates.js";
import { HttpError } from "../../errors.js";
import { checkMove, checkSubmit } from "./status.js";
import { claimDeadline, liveSplit } from "./lifecycle.js";

const num = (v: string | number | null) => (v === null ? null : Number(v));

/** The day of the last packet the mail server took for this claim, and whether a send is still pending. */
export async function mailState(db: Db, claimId: string): Promise<{ sentOn: string | null; pending: boolean }> {
  const sends = await claimSends(db, [claimId]);
  const sent = sends.filter((s) => s.status === "sent" && s.sent_at).at(-1);
  const last = sends.at(-1);
  return {
    sentOn: sent ? todayIso(new Date(sent.sent_at!)) : null,
    pending: Boolean(last && (last.status === "queued" || last.status === "sending")),
  };
}

/** Applies the change, or answers 409 in words when the move is not allowed or someone moved the claim first. */
export async function changeClaimStatus(db: Db, claim: ClaimRow, change: StatusChangeBody, actor: Actor): Promise<void> {
  const from = claim.status as ClaimStatus;
  const id = String(claim.claim_id);
  const claimed = num(claim.amount_claimed);
  const verdict = checkMove(from, change, claimed);
  if (!verdict.ok) throw new HttpError(409, "illegal_move", verdict.message, { from, to: change.to });
  let fields: MoveFields = {};
  let audit: Record<string, unknown> = {};
  if (change.to === "submitted") {
    const today = todayIso();
    const deadline = claimDeadline(claim, today);
    const mail = await mailState(db, id);
    const check = checkSubmit({
      deadline: deadline.deadline,
      today,
      sentOn: mail.sentOn,
      pendingSend: mail.pending,
      filing: change.filing ?? null,
      confirmLate: change.confirmLate === true,
      closedDate: claim.closed_date,
    });
    if (!check.ok) throw new HttpError(check.code === "bad_filing_date" ? 400 : 409, check.code, check.message, check.daysLate ? { daysOverdue: check.daysLate } : undefined);
    // the amount goes out as the lines stand at filing
    const split = await liveSplit(db, claim);
    fields = { filed_via: check.via, filed_reference: check.reference, filed_on: check.filedOn, days_late: check.daysLate, amount_claimed: split.amountClaimed };
    audit = { via: check.via, reference: check.reference, filedOn: check.filedOn, daysLate: check.daysLate, deadline: deadline.deadline, amountClaimed: split.amountClaimed };
  } else if (change.to === "accepted" || change.to === "partly_accepted") {
    const paid = change.amount ?? claimed;
    fields = { amount_paid: paid, ...(change.to === "partly_accepted" ? { reason: change.reason ?? null } : {}) };
    audit = { amountPaid: paid, amountClaimed: claimed, ...(change.to === "partly_accepted" ? { reason: change.reason } : {}) };
  } else if (change.to === "rejected") {
    fields = { reason: change.reason ?? null };
    audit = { reason: change.reason, amountClaimed: claimed };
  } else if (change.to === "credited") {
    fields = { amount_credited: change.amount ?? null };
    audit = { amountCredited: change.amount };
  } else if (change.to === "written_off") {
    fields = { written_off_reason: change.reason ?? null };
    audit = { reason: change.reason, amountClaimed: claimed };
  }
  const moved = await moveClaim(db, id, from, change.to, fields, actor, audit);
  if (!moved) throw new HttpError(409, "changed_meanwhile", "Someone changed this claim's status a moment ago. Reload the claim and try again.");
}
