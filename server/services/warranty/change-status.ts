/** Moving a claim to its next state: the rules of status.ts are checked, then the change is stored with its audit row. */
import type { Db } from "../../db/database.js";
import { updateClaimStatus, type Actor, type ClaimRow } from "../../db/queries/claims.js";
import type { ClaimStatus, StatusChangeBody } from "../../../shared/schemas/claims.js";
import { HttpError } from "../../errors.js";
import { checkMove } from "./status.js";

/** Applies the change, or answers 409 in words when the move is not allowed or someone moved the claim first. */
export async function changeClaimStatus(db: Db, claim: ClaimRow, change: StatusChangeBody, actor: Actor): Promise<void> {
  const from = claim.status as ClaimStatus;
  const verdict = checkMove(from, change);
  if (!verdict.ok) throw new HttpError(409, "illegal_move", verdict.message, { from, to: change.to });
  const moved = await updateClaimStatus(db, String(claim.claim_id), from, change.to, { reason: change.reason ?? null, amount: change.amount ?? null }, actor);
  if (!moved) throw new HttpError(409, "changed_meanwhile", "Someone changed this claim's status a moment ago. Reload the claim and try again.");
}
