/**
 * Warranty claims: previews and drafts from a repair line or a cluster, the claim queue, and a claim with its
 * evidence, audit trail, attachments and sends.
 */
import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ClaimDetail, ClaimPreview, ClaimSend, ClaimStatus, ClaimSummary, ClusterSnapshot, CreateClaim, RepairLineEvidence } from "../../../shared/schemas/claims.js";
import { safetyCautionsIn } from "../../../shared/measurement-interpretation.js";
import { HttpError, notFound } from "../../errors.js";
import type { Storage } from "../storage.js";
import { clusterCaution, clusterMethod, clustersOf, findClusters } from "../cluster-finder.js";
import {
  claimAttachments, claimAudit, claimLineKeys, claimSends, claimsHoldingLines, getClaim, insertClaim, listClaims, policyFor,
  hourTrail, policyVersionById, repairLinesByKeys, type Actor, type ClaimRow, type PolicyRow,
} from "../../db/queries/claims.js";
import { judgedUnderWords } from "./eligibility.js";
import { currentSpec } from "../../db/queries/engine-family-specs.js";
import { eligibilityCounts, judging, mainEngineFamily, toEvidence } from "./evidence.js";
import { compareByDeadline, filingDeadline } from "./deadline.js";
import { allowedMoves, checkSubmit } from "./status.js";
import { splitClaimLines } from "./claim-amount.js";
import { bucketOf, bucketTotals } from "./claim-money.js";
import { auditSentence } from "./audit-text.js";
import { claimDeadline, inclusionsOf } from "./lifecycle.js";
import { claimVersions, successorsOf } from "../../db/queries/claim-lifecycle.js";
import { mailState } from "./change-status.js";
import type { ClaimBuckets } from "../../../shared/schemas/claim-lifecycle.js";
import { todayIso } from "../../../shared/dates.js";
import { renderPacket } from "./packet.js";
import { claimNarrative } from "../../db/queries/claim-story.js";
import type { ClaimSnapshotForPacket, PacketAttachment } from "./packet-types.js";

const iso = (d: Date | string | null) => (d === null ? null : d instanceof Date ? d.toISOString() : new Date(d).toISOString());
const num = (v: string | number | null) => (v === null ? null : Number(v));
const imageTypes = new Set(["image/png", "image/jpeg", "image/webp", "image/gif"]);


/**
 * Repair lines as evidence; a single line (a repair claim) also carries its machine's hour-meter trail. Each
 * line is judged under its engine family's current policy version, or under `judgedUnder` (a claim's own).
 */
export async function evidenceFor(db: Db, scope: ShopScope, keys: readonly string[], today: string, judgedUnder: PolicyRow | null = null): Promise<RepairLineEvidence[]> {
  const { lines, measurements, faults } = await repairLinesByKeys(db, scope, keys);
  const policies = new Map<string, PolicyRow>();
  const specs = new Map<string, Awaited<ReturnType<typeof currentSpec>>>();
  for (const fam of new Set(lines.map((l) => l.engine_family))) {
    policies.set(fam, judgedUnder ?? (await policyFor(db, fam)));
    specs.set(fam, await currentSpec(db, fam));
  }
  const trail = lines.length === 1 ? await hourTrail(db, lines[0].machine_key, lines[0].opened_date) : null;
  return lines.map((l) => {
    const p = policies.get(l.engine_family)!;
    return toEvidence(l, measurements, faults, p.claim_days, today, trail, judging(p), specs.get(l.engine_family) ?? null);
  });
}

/** The cluster with this id in the caller's scan (same scope and query parameters as the Clusters page), or 404. */
async function clusterById(db: Db, scope: ShopScope, id: string, query: Record<string, string>): Promise<ClusterSnapshot> {
  const found = await findClusters(db, scope, query);
  const { components, query: q } = found;
  const cluster = clustersOf(found).find((c) => c.id === id);
  if (!cluster) {
    throw new HttpError(
      404,
      "cluster_not_found",
      "No cluster with that id in the current scan: the data may have been reloaded since the link was made, or the scan's filters differ. Pick the cluster again from the list.",
    );
  }
  return { cluster: { ...cluster, repairLineIds: [...cluster.repairLineIds] }, components, method: clusterMethod(q.standardise, q.level), caution: clusterCaution, query, takenAt: new Date().toISOString() };
}

/** Campaign deadline: claim days after the newest RO close among its lines (the last line still in time). */
function campaignClose(lines: readonly RepairLineEvidence[]): string | null {
  const closes = lines.map((l) => l.closedDate).filter((d): d is string => d !== null).sort();
  return closes.at(-1) ?? null;
}

const describeLine = (l: RepairLineEvidence) => `${l.component.name} on ${l.machine.serial} (${l.machine.modelLine}), RO ${l.roNumber}/${l.lineNo} at ${l.shopCode}`;

interface Draft {
  kind: "repair" | "campaign";
  title: string;
  lines: RepairLineEvidence[];
  cluster: ClusterSnapshot | null;
  closedDate: string | null;
  problems: string[];
}

async function draftFor(db: Db, scope: ShopScope, src: { repairLineId?: string; clusterId?: string; clusterQuery?: Record<string, string> }, today: string): Promise<Draft> {
  if (src.repairLineId) {
    const lines = await evidenceFor(db, scope, [src.repairLineId], today);
    const l = lines[0];
    if (!l) throw notFound(`Repair line ${src.repairLineId}`);
    const problems: string[] = [];
    if (!l.closedDate) problems.push("The repair order is still open: the filing deadline counts from its close, so close it first.");
    if (l.eligibility.verdict === "not_covered") problems.push(`The failure is outside warranty: ${l.eligibility.summary}`);
    return { kind: "repair", title: describeLine(l), lines, cluster: null, closedDate: l.closedDate, problems };
  }
  const snap = await clusterById(db, scope, src.clusterId!, src.clusterQuery ?? {});
  const lines = await evidenceFor(db, scope, snap.cluster.repairLineIds, today);
  const problems: string[] = [];
  if (lines.length === 0) problems.push("None of the cluster's repair lines is in your shops.");
  const closedDate = campaignClose(lines);
  if (lines.length && !closedDate) problems.push("None of the cluster's repair orders is closed yet.");
  return { kind: "campaign", title: `Campaign case: ${snap.cluster.description}`, lines, cluster: snap, closedDate, problems };
}

/** What a claim from a repair line or a cluster would hold, before it is made. */
export async function previewClaim(db: Db, scope: ShopScope, q: { repairLine?: string; cluster?: string; unit: "C" | "F" }, clusterQuery: Record<string, string>): Promise<ClaimPreview> {
  const today = todayIso();
  const d = await draftFor(db, scope, { repairLineId: q.repairLine, clusterId: q.cluster, clusterQuery }, today);
  const family = mainEngineFamily(d.lines);
  const policy = await policyFor(db, family);
  const holding = await claimsHoldingLines(db, d.lines.map((l) => l.id));
  const existing = [...new Map(holding.map((h) => [String(h.claim_id), { id: String(h.claim_id), claimNumber: h.claim_number, kind: h.kind, status: h.status }])).values()];
  return {
    kind: d.kind,
    title: d.title,
    lines: d.lines,
    eligibilityCounts: eligibilityCounts(d.lines),
    deadline: d.closedDate ? filingDeadline(d.closedDate, policy.claim_days, today) : null,
    // the covered lines only; the others are listed apart until the clerk includes one deliberately on the claim
    ...(() => {
      const split = splitClaimLines(d.lines, new Map());
      return { amountClaimed: split.amountClaimed, split };
    })(),
    cluster: d.cluster,
    existingClaims: existing,
    problems: d.problems,
    cautions: [...safetyCautionsIn(q.unit)],
  };
}

/** Makes a claim (repair) or a campaign case (cluster) in draft, with its lines and first audit row. */
export async function createClaim(db: Db, scope: ShopScope, actor: Actor, body: CreateClaim): Promise<string> {
  const today = todayIso();
  const d =
    body.kind === "repair"
      ? await draftFor(db, scope, { repairLineId: body.repairLineId }, today)
      : await draftFor(db, scope, { clusterId: body.clusterId, clusterQuery: body.clusterQuery }, today);
  if (d.lines.length === 0) throw new HttpError(422, "no_lines", d.problems[0] ?? "The claim would hold no repair lines.");
  if (!d.closedDate) throw new HttpError(422, "repair_order_open", d.problems.find((p) => p.includes("open") || p.includes("closed")) ?? "The repair order is still open.");
  if (d.kind === "repair") {
    if (d.lines[0].eligibility.verdict === "not_covered") throw new HttpError(422, "not_eligible", `No claim was made. ${d.lines[0].eligibility.summary}`);
    const held = (await claimsHoldingLines(db, [d.lines[0].id])).filter((h) => h.kind === "repair");
    if (held.length) throw new HttpError(409, "already_claimed", `Repair line ${d.lines[0].id} already has claim ${held[0].claim_number}; open that claim instead.`, { claimId: String(held[0].claim_id) });
  }
  const family = mainEngineFamily(d.lines);
  const policy = await policyFor(db, family);
  const deadline = filingDeadline(d.closedDate, policy.claim_days, today);
  const shops = [...new Set(d.lines.map((l) => l.shopCode))];
  return await insertClaim(
    db,
    {
      kind: d.kind,
      title: d.title,
      shop_code: shops.length === 1 ? shops[0] : null,
      engine_family: family,
      closed_date: d.closedDate,
      claim_days: policy.claim_days,
      policy_version_id: policy.policy_version_id,
      deadline: deadline.deadline,
      amount_claimed: splitClaimLines(d.lines, new Map()).amountClaimed,
      note: body.note?.trim() || null,
      cluster_id: d.cluster?.cluster.id ?? null,
      cluster_snapshot: d.cluster,
      temperature_unit: body.unit ?? (body.kind === "campaign" && body.clusterQuery?.unit === "F" ? "F" : "C"),
      created_by: actor.sub,
      created_by_name: actor.name,
    },
    d.lines.map((l) => ({ key: l.id, shopCode: l.shopCode })),
    actor,
    (() => {
      const split = splitClaimLines(d.lines, new Map());
      return { amountClaimed: split.amountClaimed, linesApart: split.apart.length };
    })(),
  );
}

type SendRow = Awaited<ReturnType<typeof claimSends>>[number];
const toSend = (s: SendRow): ClaimSend => ({
  id: String(s.send_id),
  toAddress: s.to_address,
  status: s.status,
  attempts: s.attempts,
  lastError: s.last_error,
  requestedBy: s.requested_by,
  requestedAt: iso(s.requested_at)!,
  sentAt: iso(s.sent_at),
});

function toSummary(c: ClaimRow, lineCount: number, lastSend: ClaimSend | null, today: string, supersededBy: string | null = null): ClaimSummary {
  return {
    id: String(c.claim_id),
    claimNumber: c.claim_number,
    kind: c.kind,
    status: c.status,
    title: c.title,
    shopCode: c.shop_code,
    engineFamily: c.engine_family,
    closedDate: c.closed_date,
    deadline: claimDeadline(c, today),
    lineCount,
    amountClaimed: num(c.amount_claimed),
    amountCredited: num(c.amount_credited),
    lastSend,
    createdAt: iso(c.created_at)!,
    createdBy: c.created_by_name,
    revision: c.revision,
    supersededBy,
    amountPaid: num(c.amount_paid),
    filing: c.filed_via ? { via: c.filed_via, reference: c.filed_reference, filedOn: c.filed_on, daysLate: c.days_late } : null,
    bucket: bucketOf(c.status as ClaimStatus, supersededBy),
  };
}

/**
 * The queue by urgency: claims to file (nearest deadline first), waiting for the maker (longest waiting first),
 * rejected and open for a correction (newest first), then closed ones (newest first), with each bucket's count
 * and the money at stake in it.
 */
export async function claimQueue(db: Db, scope: ShopScope): Promise<{ today: string; claims: ClaimSummary[]; buckets: ClaimBuckets }> {
  const today = todayIso();
  const rows = await listClaims(db, scope);
  const ids = rows.map((r) => String(r.claim_id));
  const sends = await claimSends(db, ids);
  const next = await successorsOf(db, ids);
  const last = new Map<string, ClaimSend>();
  for (const s of sends) last.set(String(s.claim_id), toSend(s));
  const claims = rows.map((r) => toSummary(r, Number(r.line_count ?? 0), last.get(String(r.claim_id)) ?? null, today, next.get(String(r.claim_id)) ?? null));
  const newest = (a: ClaimSummary, b: ClaimSummary) => b.createdAt.localeCompare(a.createdAt);
  const toFile = claims.filter((c) => c.bucket === "toFile").sort((a, b) => compareByDeadline(a.deadline, b.deadline));
  const waiting = claims.filter((c) => c.bucket === "waiting").sort((a, b) => (a.filing?.filedOn ?? "").localeCompare(b.filing?.filedOn ?? "") || a.createdAt.localeCompare(b.createdAt));
  const rejected = claims.filter((c) => c.bucket === "rejected").sort(newest);
  const closed = claims.filter((c) => c.bucket === "closed").sort(newest);
  return { today, claims: [...toFile, ...waiting, ...rejected, ...closed], buckets: bucketTotals(claims) };
}

/** The claim's row when it is in the caller's scope; 404 otherwise. */
export async function claimInScope(db: Db, scope: ShopScope, id: string): Promise<ClaimRow> {
  const c = await getClaim(db, scope, id);
  if (!c) throw notFound(`Claim ${id}`);
  return c;
}

export interface DetailDeps {
  db: Db;
  storage?: Storage;
  canSend: boolean;
}

/** A claim with its evidence, audit trail, attachments and sends, or 404 outside the caller's scope. */
export async function claimDetail(deps: DetailDeps, scope: ShopScope, id: string): Promise<ClaimDetail> {
  const { db } = deps;
  const today = todayIso();
  const c = await claimInScope(db, scope, id);
  const keys = await claimLineKeys(db, id);
  // the claim's own scope was checked above; its lines are read group-wide so a campaign case stays whole,
  // judged under the policy version the claim was made under
  const judgedUnder = (await policyVersionById(db, String(c.policy_version_id))) ?? null;
  const lines = await evidenceFor(db, { kind: "all" }, keys, today, judgedUnder);
  const sends = (await claimSends(db, [id])).map(toSend);
  const policy = await policyFor(db, c.engine_family);
  const audit = await claimAudit(db, id);
  const attachments = await claimAttachments(db, id);
  const split = splitClaimLines(lines, await inclusionsOf(db, id));
  const supersededBy = (await successorsOf(db, [id])).get(id) ?? null;
  const versions = await claimVersions(db, id);
  const summary = toSummary(c, keys.length, sends.at(-1) ?? null, today, supersededBy);
  let submitCheck: ClaimDetail["submitCheck"] = null;
  if (c.status === "draft") {
    const mail = await mailState(db, id);
    const daysOverdue = Math.max(0, -summary.deadline.daysLeft);
    const check = checkSubmit({ deadline: summary.deadline.deadline, today, sentOn: mail.sentOn, pendingSend: mail.pending, filing: null, confirmLate: false, closedDate: c.closed_date });
    submitCheck = { daysOverdue, sentOn: mail.sentOn, text: check.ok ? `The packet went by e-mail on ${mail.sentOn}, in time.` : check.message };
  }
  return {
    ...summary,
    // a draft claims what its lines come to now; a filed claim what it asked for when it went out
    amountClaimed: c.status === "draft" ? split.amountClaimed : summary.amountClaimed,
    split,
    correction: c.correction,
    writtenOffReason: c.written_off_reason,
    versions: versions.map((v) => ({ id: v.claim_id, revision: v.revision, status: v.status, amountClaimed: num(v.amount_claimed), reason: v.reason, correction: v.correction, createdAt: iso(v.created_at)! })),
    submitCheck,
    canResubmit: c.status === "rejected" && !supersededBy,
    policy: judgedUnder
      ? { engineFamily: judgedUnder.engine_family, version: judgedUnder.version, text: judgedUnderWords({ version: judgedUnder.version, engineFamily: judgedUnder.engine_family }) }
      : { engineFamily: policy.engine_family, version: policy.version, text: judgedUnderWords({ version: policy.version, engineFamily: policy.engine_family }) },
    reason: c.reason,
    note: c.note,
    warrantyEmail: policy.warranty_email,
    claimDays: c.claim_days,
    allowedMoves: [...allowedMoves[c.status as ClaimStatus]],
    lines,
    eligibilityCounts: eligibilityCounts(lines),
    cluster: (c.cluster_snapshot as ClusterSnapshot | null) ?? null,
    audit: audit.map((a) => ({
      id: String(a.audit_id),
      at: iso(a.at)!,
      actorName: a.actor_name,
      action: a.action,
      changes: (a.changes ?? {}) as Record<string, unknown>,
      text: auditSentence(a.action, (a.changes ?? {}) as Record<string, unknown>),
    })),
    attachments: attachments.map((a) => ({
      id: String(a.attachment_id),
      originalName: a.original_name,
      contentType: a.content_type,
      extension: a.extension,
      sizeBytes: a.size_bytes,
      isImage: imageTypes.has(a.content_type),
      uploadedBy: a.uploaded_by,
      uploadedAt: iso(a.uploaded_at)!,
    })),
    sends,
    temperatureUnit: c.temperature_unit,
    cautions: [...safetyCautionsIn(c.temperature_unit)],
    // what the attachments panel offers follows the store as it answers now, not only whether one is configured
    storageAvailable: deps.storage ? await deps.storage.available() : false,
    sendAvailable: deps.canSend,
  };
}

/** Everything the packet needs, with the embeddable images' bytes read from object storage. */
async function narrativeOf(db: Db, id: string) {
  const n = await claimNarrative(db, id);
  return { found: n.narrative_found ?? "", done: n.narrative_done ?? "", why: n.narrative_why ?? "" };
}

async function packetSnapshot(deps: { db: Db; storage?: Storage }, detail: ClaimDetail): Promise<ClaimSnapshotForPacket> {
  const rows = await claimAttachments(deps.db, detail.id);
  const attachments: PacketAttachment[] = [];
  for (const a of rows) {
    let data: Buffer | null = null;
    if (deps.storage && (a.content_type === "image/png" || a.content_type === "image/jpeg")) data = await deps.storage.readObject(a.s3_key, ", so the claim packet cannot be put together with its photos");
    attachments.push({ originalName: a.original_name, contentType: a.content_type, sizeBytes: a.size_bytes, uploadedAt: iso(a.uploaded_at)!, uploadedBy: a.uploaded_by, data });
  }
  return {
    claimNumber: detail.claimNumber,
    kind: detail.kind,
    status: detail.status,
    title: detail.title,
    shopCode: detail.shopCode,
    engineFamily: detail.engineFamily,
    deadlineText: detail.deadline.text,
    amountClaimed: detail.amountClaimed,
    warrantyEmail: detail.warrantyEmail,
    createdBy: detail.createdBy,
    createdAt: detail.createdAt,
    reason: detail.reason,
    note: detail.note,
    lines: detail.lines,
    eligibilityCounts: detail.eligibilityCounts,
    cluster: detail.cluster,
    attachments,
    temperatureUnit: detail.temperatureUnit,
    narrative: await narrativeOf(deps.db, detail.id),
    cautions: detail.cautions,
    split: detail.split,
    revision: detail.revision,
    correction: detail.correction,
    policyText: detail.policy.text,
    generatedAt: new Date().toISOString(),
  };
}

/** The claim packet as a PDF, rendered afresh from the claim as it stands. */
export async function packetPdf(deps: { db: Db; storage?: Storage }, detail: ClaimDetail): Promise<Buffer> {
  return await renderPacket(await packetSnapshot(deps, detail));
}
