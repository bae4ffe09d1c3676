/** A claim's states and the moves between them, with the reason in words when a move is refused. */
import type { ClaimStatus } from "../../../shared/schemas/claims.js";

export const statusLabels: Record<ClaimStatus, string> = {
  draft: "Draft",
  submitted: "Submitted to the maker",
  accepted: "Accepted by the maker",
  rejected: "Rejected by the maker",
  credited: "Credited",
};

/** The moves a claim may make: draft → submitted → accepted or rejected; accepted → credited. */
export const allowedMoves: Record<ClaimStatus, readonly ClaimStatus[]> = {
  draft: ["submitted"],
  submitted: ["accepted", "rejected"],
  accepted: ["credited"],
  rejected: [],
  credited: [],
};

export interface StatusChange {
  to: ClaimStatus;
  /** the maker's reason; required for a rejection */
  reason?: string | null;
  /** the amount credited; required for credited */
  amount?: number | null;
}

export type MoveCheck = { ok: true } | { ok: false; message: string };

const stepsTo: Record<ClaimStatus, string> = {
  draft: "",
  submitted: "submit it",
  accepted: "record the maker's acceptance",
  rejected: "record the maker's rejection",
  credited: "record the credit",
};

/** Whether a status change is legal, and if not, why in words. */
export function checkMove(from: ClaimStatus, change: StatusChange): MoveCheck {
  const to = change.to;
  if (from === to) return { ok: false, message: `The claim is already ${statusLabels[to].toLowerCase()}.` };
  if (!allowedMoves[from].includes(to)) {
    if (allowedMoves[from].length === 0)
      return { ok: false, message: `A claim that is ${statusLabels[from].toLowerCase()} is closed: it cannot become ${statusLabels[to].toLowerCase()}.` };
    const next = allowedMoves[from].map((s) => stepsTo[s]).join(" or ");
    return { ok: false, message: `A claim in state "${statusLabels[from]}" cannot become "${statusLabels[to]}"; the next step is to ${next}.` };
  }
  if (to === "rejected" && !change.reason?.trim()) return { ok: false, message: "A rejection needs the maker's reason." };
  if (to === "credited" && !(typeof change.amount === "number" && Number.isFinite(change.amount) && change.amount > 0))
    return { ok: false, message: "A credit needs the amount the maker credited, greater than zero." };
  return { ok: true };
}
