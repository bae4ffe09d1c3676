/** A claim's states and the moves between them, with the reason in words when a move is refused. */
import type { ClaimStatus } from "../../../shared/schemas/claims.js";
import { addDays, daysBetween } from "../../../shared/dates.js";
import { plural } from "../../../shared/text.js";
import type { Deadline } from "./deadline.js";

export const statusLabels: Record<ClaimStatus, string> = {
  draft: "Draft",
  submitted: "Submitted to the maker",
  accepted: "Accepted by the maker",
  partly_accepted: "Partly accepted by the maker",
  rejected: "Rejected by the maker",
  credited: "Credited",
  written_off: "Written off",
};

/**
 * The moves a claim may make: draft → submitted → accepted, partly accepted or rejected; accepted or partly
 * accepted → credited; rejected → written off (or corrected as a new version, which is not a move of this one).
 */
export const allowedMoves: Record<ClaimStatus, readonly ClaimStatus[]> = {
  draft: ["submitted"],
  submitted: ["accepted", "partly_accepted", "rejected"],
  accepted: ["credited"],
  partly_accepted: ["credited"],
  rejected: ["written_off"],
  credited: [],
  written_off: [],
};

export interface StatusChange {
  to: ClaimStatus;
  /** the maker's reason (rejection, partial acceptance) or the clerk's (write-off) */
  reason?: string | null;
  /** the amount paid (acceptance, partial acceptance) or credited */
  amount?: number | null;
}

export type MoveCheck = { ok: true } | { ok: false; message: string };

const stepsTo: Record<ClaimStatus, string> = {
  draft: "",
  submitted: "submit it",
  accepted: "record the maker's acceptance",
  partly_accepted: "record a partial acceptance",
  rejected: "record the maker's rejection",
  credited: "record the credit",
  written_off: "write it off",
};

const money = (n: number) => n.toLocaleString("en-US", { minimumFractionDigits: 2, maximumFractionDigits: 2 });
const positive = (n: number | null | undefined): n is number => typeof n === "number" && Number.isFinite(n) && n > 0;

/** Whether a status change is legal, and if not, why in words. `claimed` is the amount the claim asks for. */
export function checkMove(from: ClaimStatus, change: StatusChange, claimed: number | null = null): MoveCheck {
  const to = change.to;
  if (from === to) return { ok: false, message: `The claim is already ${statusLabels[to].toLowerCase()}.` };
  if (!allowedMoves[from].includes(to)) {
    if (allowedMoves[from].length === 0)
      return { ok: false, message: `A claim that is ${statusLabels[from].toLowerCase()} is closed: it cannot become ${statusLabels[to].toLowerCase()}.` };
    const steps = allowedMoves[from].map((s) => stepsTo[s]);
    const next = steps.length > 1 ? `${steps.slice(0, -1).join(", ")} or ${steps.at(-1)}` : steps[0];
    const resubmit = from === "rejected" ? ", or correct it and resubmit it as a new version" : "";
    return { ok: false, message: `A claim in state "${statusLabels[from]}" cannot become "${statusLabels[to]}"; the next step is to ${next}${resubmit}.` };
  }
  if (to === "rejected" && !change.reason?.trim()) return { ok: false, message: "A rejection needs the maker's reason." };
  if (to === "written_off" && !change.reason?.trim()) return { ok: false, message: "Writing a claim off needs your reason for not pursuing it." };
  if (to === "partly_accepted") {
    if (!change.reason?.trim()) return { ok: false, message: "A partial acceptance needs the maker's reason for what it did not pay." };
    if (!positive(change.amount)) return { ok: false, message: "A partial acceptance needs the amount the maker pays, greater than zero." };
    if (claimed !== null && change.amount >= claimed)
      return { ok: false, message: `A partial acceptance pays less than the ${money(claimed)} claimed; the maker pays ${money(change.amount)}, so record an acceptance instead.` };
  }
  if (to === "accepted" && change.amount !== undefined && change.amount !== null && !positive(change.amount))
    return { ok: false, message: "An acceptance's amount paid must be greater than zero (leave it out when the maker pays what was claimed)." };
  if (to === "credited" && !positive(change.amount)) return { ok: false, message: "A credit needs the amount the maker credited, greater than zero." };
  return { ok: true };
}

/**
 * Days a filing is late: the calendar days from the deadline to the day it went out, 0 when it went out on or
 * before the deadline.
 */
export function daysLate(deadline: string, filedOn: string): number {
  return Math.max(0, daysBetween(deadline, filedOn));
}

export interface SubmitInput {
  deadline: string;
  today: string;
  /** the day of the last packet e-mailed from here that the mail server took, if any */
  sentOn: string | null;
  /** a send still queued or going, if any */
  pendingSend: boolean;
  /** the way out recorded by the clerk, when the claim went another way */
  filing: { reference: string; filedOn: string } | null;
  confirmLate: boolean;
  closedDate: string;
}

export type SubmitCheck =
  | { ok: true; via: "mail" | "other"; reference: string | null; filedOn: string; daysLate: number }
  | { ok: false; code: "not_sent" | "late_unconfirmed" | "bad_filing_date"; message: string; daysLate?: number };

/**
 * Whether a draft may be marked submitted: it must have gone to the maker (a packet e-mailed from here that the
 * mail server took, or a way out the clerk records with its reference and date), and a filing after the deadline
 * needs the clerk's explicit confirmation with the days overdue stated. A recorded way out wins over the e-mail.
 */
export function checkSubmit(i: SubmitInput): SubmitCheck {
  let via: "mail" | "other";
  let filedOn: string;
  let reference: string | null = null;
  if (i.filing) {
    if (daysBetween(i.today, i.filing.filedOn) > 0)
      return { ok: false, code: "bad_filing_date", message: `The filing date ${i.filing.filedOn} is after today (${i.today}); give the day the claim went out.` };
    if (daysBetween(i.closedDate, i.filing.filedOn) < 0)
      return { ok: false, code: "bad_filing_date", message: `The filing date ${i.filing.filedOn} is before the repair order closed (${i.closedDate}); give the day the claim went out.` };
    via = "other";
    filedOn = i.filing.filedOn;
    reference = i.filing.reference;
  } else if (i.sentOn) {
    via = "mail";
    filedOn = i.sentOn;
  } else {
    const pending = i.pendingSend ? " The packet is still waiting to go; it counts once the mail server takes it." : "";
    return {
      ok: false,
      code: "not_sent",
      message: `The claim has not gone to the maker: send the packet from here, or record how it went out (the portal's reference and the date) before marking it submitted.${pending}`,
    };
  }
  const late = daysLate(i.deadline, filedOn);
  if (late > 0 && !i.confirmLate)
    return {
      ok: false,
      code: "late_unconfirmed",
      daysLate: late,
      message: `Filed on ${filedOn}, the claim is ${plural(late, "day")} past its deadline of ${i.deadline}, and the maker may refuse it as late. Confirm the late filing to submit it anyway.`,
    };
  return { ok: true, via, reference, filedOn, daysLate: late };
}

/**
 * The deadline of a corrected version: the claim days again from the day the maker's rejection was recorded,
 * but never earlier than the first filing's deadline (common practice, no source: makers commonly allow a
 * rejected claim to be corrected within their usual filing window from the rejection).
 */
export function resubmitDeadline(rejectedOn: string, claimDays: number, firstDeadline: string): string {
  const fromRejection = addDays(rejectedOn, claimDays);
  return fromRejection > firstDeadline ? fromRejection : firstDeadline;
}

/** A version's deadline and the days left to it, stated from the rejection it corrects. */
export function versionDeadline(rejectedOn: string, claimDays: number, firstDeadline: string, today: string): Deadline {
  const deadline = resubmitDeadline(rejectedOn, claimDays, firstDeadline);
  const daysLeft = daysBetween(today, deadline);
  const basis =
    deadline === firstDeadline
      ? `first filing's deadline ${firstDeadline} (later than rejection ${rejectedOn} + ${plural(claimDays, "day")})`
      : `rejection recorded ${rejectedOn} + ${plural(claimDays, "day")} = deadline ${deadline}`;
  if (daysLeft > 0) return { deadline, daysLeft, state: "open", text: `Corrected version: ${basis}; ${plural(daysLeft, "day")} left.` };
  if (daysLeft === 0) return { deadline, daysLeft, state: "due_today", text: `Corrected version: ${basis}; due today.` };
  return { deadline, daysLeft, state: "overdue", text: `Corrected version: ${basis}; overdue by ${plural(-daysLeft, "day")}.` };
}
