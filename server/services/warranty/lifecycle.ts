/**
 * A claim's money and lifecycle around its status: the lines in the amount claimed and those listed apart, a
 * line included deliberately, the corrected version of a rejected claim, and the money report.
 */
import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ClaimLineSplit, ClaimMoney, LineInclusionBody } from "../../../shared/schemas/claim-lifecycle.js";
import type { ClaimStatus } from "../../../shared/schemas/claims.js";
import { todayIso } from "../../../shared/dates.js";
import { HttpError, notFound } from "../../errors.js";
import { claimLineKeys, getClaim, listClaims, policyVersionById, repairLinesByKeys, type Actor, type ClaimRow } from "../../db/queries/claims.js";
import { claimHoldsLine, claimInclusions, insertVersion, rejectedOn, setLineInclusion, successorsOf } from "../../db/queries/claim-lifecycle.js";
import { splitClaimLines, type CostedLine, type Inclusion } from "./claim-amount.js";
import { moneyReport } from "./claim-money.js";
import { filingDeadline, type Deadline } from "./deadline.js";
import { judging, lineEligibility } from "./evidence.js";
import { versionDeadline } from "./status.js";

const num = (v: string | number | null) => (v === null ? null : Number(v));
const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

/** The deadline of a claim: RO close + claim days for a first filing; from the rejection for a corrected version. */
export function claimDeadline(c: Pick<ClaimRow, "closed_date" | "claim_days" | "resubmit_from" | "revision">, today: string): Deadline {
  const first = filingDeadline(c.closed_date, c.claim_days, today);
  if (c.revision > 1 && c.resubmit_from) return versionDeadline(c.resubmit_from, c.claim_days, first.deadline, today);
  return first;
}

/** The cover terms of the policy version the claim was judged under (null: the defaults). */
async function judgedUnder(db: Db, c: Pick<ClaimRow, "policy_version_id">) {
  const p = c.policy_version_id ? await policyVersionById(db, String(c.policy_version_id)) : undefined;
  return p ? judging(p) : null;
}

/** The claim's deliberate inclusions by repair line id. */
export async function inclusionsOf(db: Db, claimId: string): Promise<Map<string, Inclusion>> {
  const rows = await claimInclusions(db, claimId);
  return new Map(rows.map((r) => [String(r.repair_line_key), { reason: r.include_reason!, by: r.included_by!, at: iso(r.included_at)! }]));
}

/** The split of lines as the warehouse stands now (read group-wide: the claim's own scope is checked by the caller). */
export async function liveSplit(db: Db, claim: Pick<ClaimRow, "claim_id" | "policy_version_id">): Promise<ClaimLineSplit> {
  const id = String(claim.claim_id);
  const keys = await claimLineKeys(db, id);
  const { lines } = await repairLinesByKeys(db, { kind: "all" }, keys);
  const policy = await judgedUnder(db, claim);
  const costed: CostedLine[] = lines.map((l) => ({ id: String(l.repair_line_key), partsCost: num(l.parts_cost), laborCost: num(l.labor_cost), eligibility: lineEligibility(l, policy) }));
  return splitClaimLines(costed, await inclusionsOf(db, id));
}

async function claimOr404(db: Db, scope: ShopScope, id: string): Promise<ClaimRow> {
  const c = await getClaim(db, scope, id);
  if (!c) throw notFound(`Claim ${id}`);
  return c;
}

/** Includes a line that is not covered in the amount claimed (with the clerk's reason), or leaves it out again. */
export async function changeLineInclusion(db: Db, scope: ShopScope, claimId: string, lineId: string, body: LineInclusionBody, actor: Actor): Promise<void> {
  const c = await claimOr404(db, scope, claimId);
  if (c.status !== "draft")
    throw new HttpError(409, "claim_filed", `Only a draft's lines can change; claim ${c.claim_number} is ${(c.status as string).replace("_", " ")}. ${c.status === "rejected" ? "Correct it as a new version to change what it claims." : ""}`.trim());
  if (!(await claimHoldsLine(db, claimId, lineId))) throw notFound(`Repair line ${lineId} in claim ${c.claim_number}`);
  const before = await liveSplit(db, c);
  const inc = await inclusionsOf(db, claimId);
  const apart = before.apart.find((a) => a.lineId === lineId);
  const deliberate = before.included.find((a) => a.lineId === lineId && a.basis === "included");
  const line = await describeLine(db, lineId);
  if (body.include) {
    if (!apart) {
      if (deliberate) throw new HttpError(409, "already_included", `Repair line ${line} is already included, with the reason: ${deliberate.reason}`);
      throw new HttpError(409, "covered", `Repair line ${line} is covered: it is in the amount claimed already and needs no reason.`);
    }
    inc.set(lineId, { reason: body.reason!, by: actor.name, at: new Date().toISOString() });
  } else {
    if (!inc.has(lineId)) throw new HttpError(409, "not_included", `Repair line ${line} was not included deliberately, so there is nothing to leave out.`);
    inc.delete(lineId);
  }
  const after = await splitAfter(db, c, inc);
  const ok = await setLineInclusion(db, claimId, lineId, body.include ? body.reason! : null, after.amountClaimed, actor, {
    line,
    lineId,
    ...(body.include ? { why: apart!.why, reason: body.reason } : {}),
    amountClaimed: after.amountClaimed,
  });
  if (!ok) throw new HttpError(409, "changed_meanwhile", "Someone changed this claim a moment ago. Reload the claim and try again.");
}

async function splitAfter(db: Db, c: ClaimRow, inc: Map<string, Inclusion>): Promise<ClaimLineSplit> {
  const keys = await claimLineKeys(db, String(c.claim_id));
  const { lines } = await repairLinesByKeys(db, { kind: "all" }, keys);
  const policy = await judgedUnder(db, c);
  return splitClaimLines(lines.map((l) => ({ id: String(l.repair_line_key), partsCost: num(l.parts_cost), laborCost: num(l.labor_cost), eligibility: lineEligibility(l, policy) })), inc);
}

async function describeLine(db: Db, lineId: string): Promise<string> {
  const { lines } = await repairLinesByKeys(db, { kind: "all" }, [lineId]);
  const l = lines[0];
  return l ? `RO ${l.ro_number}/${l.line_no} at ${l.shop_code} (serial ${l.serial})` : lineId;
}

/** Corrects a rejected claim as its next version (a draft with the same lines); returns the new version's id. */
export async function resubmitClaim(db: Db, scope: ShopScope, claimId: string, correction: string, actor: Actor): Promise<string> {
  const c = await claimOr404(db, scope, claimId);
  const next = (await successorsOf(db, [claimId])).get(claimId);
  if (next) throw new HttpError(409, "already_corrected", `Claim ${c.claim_number} version ${c.revision} was corrected already as version ${c.revision + 1}; open that one.`, { claimId: next });
  if (c.status !== "rejected")
    throw new HttpError(409, "not_rejected", `Only a rejected claim is corrected and resubmitted; claim ${c.claim_number} is ${(c.status as ClaimStatus).replace("_", " ")}.`);
  const today = todayIso();
  const from = (await rejectedOn(db, claimId)) ?? today;
  const first = filingDeadline(c.closed_date, c.claim_days, today).deadline;
  const deadline = versionDeadline(from, c.claim_days, first, today).deadline;
  const split = await liveSplit(db, c);
  const id = await insertVersion(db, claimId, { correction, resubmitFrom: from, deadline, amountClaimed: split.amountClaimed }, actor);
  if (!id) throw new HttpError(409, "already_corrected", `Claim ${c.claim_number} was corrected a moment ago by someone else; reload it.`);
  return id;
}

/** Claimed, paid and written off per month and per engine family, over the claims in the caller's scope. */
export async function claimMoney(db: Db, scope: ShopScope): Promise<ClaimMoney> {
  const rows = await listClaims(db, scope);
  return moneyReport(
    rows.map((r) => ({
      id: String(r.claim_id),
      previousId: r.previous_claim_id === null ? null : String(r.previous_claim_id),
      revision: r.revision,
      status: r.status as ClaimStatus,
      engineFamily: r.engine_family,
      amountClaimed: num(r.amount_claimed),
      amountPaid: num(r.amount_paid),
      amountCredited: num(r.amount_credited),
      filedOn: r.filed_on ?? (r.filed_via ? todayIso(new Date(r.updated_at)) : null),
    })),
  );
}
