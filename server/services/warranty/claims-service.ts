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
  hourTrail, repairLinesByKeys, type Actor, type ClaimRow,
} from "../../db/queries/claims.js";
import { amountOf, eligibilityCounts, mainEngineFamily, toEvidence } from "./evidence.js";
import { compareByDeadline, filingDeadline } from "./deadline.js";
import { allowedMoves } from "./status.js";
import { todayIso } from "../../../shared/dates.js";
import { renderPacket } from "./packet.js";
import type { ClaimSnapshotForPacket, PacketAttachment } from "./packet-types.js";

const iso = (d: Date | string | null) => (d === null ? null : d instanceof Date ? d.toISOString() : new Date(d).toISOString());
const num = (v: string | number | null) => (v === null ? null : Number(v));
const imageTypes = new Set(["image/png", "image/jpeg", "image/webp", "image/gif"]);

/** Repair lines as evidence; a single line (a repair claim) also carries its machine's hour-meter trail. */
export async function evidenceFor(db: Db, scope: ShopScope, keys: readonly string[], today: string): Promise<RepairLineEvidence[]> {
  const { lines, measurements, faults } = await repairLinesByKeys(db, scope, keys);
  const days = new Map<string, number>();
  for (const fam of new Set(lines.map((l) => l.engine_family))) days.set(fam, (await policyFor(db, fam)).claim_days);
  const trail = lines.length === 1 ? await hourTrail(db, lines[0].machine_key, lines[0].opened_date) : null;
  return lines.map((l) => toEvidence(l, measurements, faults, days.get(l.engine_family) ?? 30, today, trail));
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
    amountClaimed: amountOf(d.lines),
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
      deadline: deadline.deadline,
      amount_claimed: amountOf(d.lines),
      note: body.note?.trim() || null,
      cluster_id: d.cluster?.cluster.id ?? null,
      cluster_snapshot: d.cluster,
      temperature_unit: body.unit ?? (body.kind === "campaign" && body.clusterQuery?.unit === "F" ? "F" : "C"),
      created_by: actor.sub,
      created_by_name: actor.name,
    },
    d.lines.map((l) => ({ key: l.id, shopCode: l.shopCode })),
    actor,
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

function toSummary(c: ClaimRow, lineCount: number, lastSend: ClaimSend | null, today: string): ClaimSummary {
  return {
    id: String(c.claim_id),
    claimNumber: c.claim_number,
    kind: c.kind,
    status: c.status,
    title: c.title,
    shopCode: c.shop_code,
    engineFamily: c.engine_family,
    closedDate: c.closed_date,
    deadline: filingDeadline(c.closed_date, c.claim_days, today),
    lineCount,
    amountClaimed: num(c.amount_claimed),
    amountCredited: num(c.amount_credited),
    lastSend,
    createdAt: iso(c.created_at)!,
    createdBy: c.created_by_name,
  };
}

/** Open claims nearest their deadline first; claims already with the maker after them, newest first. */
export async function claimQueue(db: Db, scope: ShopScope): Promise<{ today: string; claims: ClaimSummary[] }> {
  const today = todayIso();
  const rows = await listClaims(db, scope);
  const sends = await claimSends(db, rows.map((r) => String(r.claim_id)));
  const last = new Map<string, ClaimSend>();
  for (const s of sends) last.set(String(s.claim_id), toSend(s));
  const claims = rows.map((r) => toSummary(r, Number(r.line_count ?? 0), last.get(String(r.claim_id)) ?? null, today));
  const open = claims.filter((c) => c.status === "draft").sort((a, b) => compareByDeadline(a.deadline, b.deadline));
  const filed = claims.filter((c) => c.status !== "draft").sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  return { today, claims: [...open, ...filed] };
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
  // the claim's own scope was checked above; its lines are read group-wide so a campaign case stays whole
  const lines = await evidenceFor(db, { kind: "all" }, keys, today);
  const sends = (await claimSends(db, [id])).map(toSend);
  const policy = await policyFor(db, c.engine_family);
  const audit = await claimAudit(db, id);
  const attachments = await claimAttachments(db, id);
  return {
    ...toSummary(c, keys.length, sends.at(-1) ?? null, today),
    reason: c.reason,
    note: c.note,
    warrantyEmail: policy.warranty_email,
    claimDays: c.claim_days,
    allowedMoves: [...allowedMoves[c.status as ClaimStatus]],
    lines,
    eligibilityCounts: eligibilityCounts(lines),
    cluster: (c.cluster_snapshot as ClusterSnapshot | null) ?? null,
    audit: audit.map((a) => ({ id: String(a.audit_id), at: iso(a.at)!, actorName: a.actor_name, action: a.action, changes: (a.changes ?? {}) as Record<string, unknown> })),
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
    cautions: detail.cautions,
    generatedAt: new Date().toISOString(),
  };
}

/** The claim packet as a PDF, rendered afresh from the claim as it stands. */
export async function packetPdf(deps: { db: Db; storage?: Storage }, detail: ClaimDetail): Promise<Buffer> {
  return await renderPacket(await packetSnapshot(deps, detail));
}
