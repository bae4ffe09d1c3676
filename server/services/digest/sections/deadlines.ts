import { listClaims, repairLinesByKeys } from "../../../db/queries/claims.js";
import { claimQueuePage } from "../../../db/queries/claim-queue.js";
import { DEFAULT_TERMS } from "../../warranty/eligibility.js";
import { claimDeadline } from "../../warranty/lifecycle.js";
import { filingDeadline } from "../../warranty/deadline.js";
import { claimCandidateQuerySchema } from "../../../../shared/schemas/claims.js";
import { claimRoles } from "../../../../shared/roles.js";
import { capped, hasRole, type DigestContext, type SectionSource } from "../section.js";

/** Filing deadlines this near (days from the digest's day, both ends counted) are listed. */
export const NEAR_DAYS = 14;

interface Due {
  shopCode: string | null;
  deadline: string;
  daysLeft: number;
}

export interface DeadlinesData {
  /** the reader may open the claims pages (clerk or manager); otherwise only counts are given */
  canOpenClaims: boolean;
  groupWide: boolean;
  /** draft claims whose deadline is 0–NEAR_DAYS days away */
  drafts: (Due & { id: string; claimNumber: string; title: string })[];
  /** unclaimed repair lines inside cover whose deadline is 0–NEAR_DAYS days away */
  lineCount: number;
  /** the nearest of them */
  nearestLines: (Due & { id: string; roNumber: string; lineNo: number })[];
}

const left = (n: number) => (n === 0 ? "due today" : n === 1 ? "1 day left" : `${n} days left`);
const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** Draft claims and unclaimed lines whose filing deadline falls in the next NEAR_DAYS days, nearest first. */
export function buildDeadlines(d: DeadlinesData, t: { link: (path: string) => string }) {
  const title = `Claims and lines due in the next ${NEAR_DAYS} days${d.groupWide ? " (group-wide)" : ""}`;
  const summary = `${plural(d.drafts.length, "draft claim", "draft claims")} and ${plural(d.lineCount, "unclaimed repair line", "unclaimed repair lines")} inside cover reach their filing deadline in the next ${NEAR_DAYS} days.`;
  if (!d.canOpenClaims) return { key: "deadlines", title, lines: [summary], links: [] };
  const drafts = [...d.drafts].sort((a, b) => a.daysLeft - b.daysLeft);
  const lines = [
    summary,
    ...capped(drafts.map((c) => `Claim ${c.claimNumber}${c.shopCode ? ` (${c.shopCode})` : ""}: ${c.title}, deadline ${c.deadline}, ${left(c.daysLeft)}.`), 8, "draft claims"),
    ...d.nearestLines.map((l) => `Repair order ${l.roNumber} line ${l.lineNo}${l.shopCode ? ` (${l.shopCode})` : ""}: not claimed, deadline ${l.deadline}, ${left(l.daysLeft)}.`),
  ];
  return {
    key: "deadlines",
    title,
    lines,
    links: [
      ...drafts.slice(0, 8).map((c) => ({ label: `Claim ${c.claimNumber}`, url: t.link(`/claims/${encodeURIComponent(c.id)}`) })),
      { label: "Open the claims queue", url: t.link("/claims") },
    ],
  };
}

export async function loadDeadlines(ctx: DigestContext): Promise<DeadlinesData> {
  const { db, date } = ctx;
  const scope = ctx.reader.scope;
  const drafts = (await listClaims(db, scope))
    .filter((c) => c.status === "draft")
    .map((c) => ({ id: String(c.claim_id), claimNumber: c.claim_number, title: c.title, shopCode: c.shop_code, ...claimDeadline(c, date) }))
    .filter((c) => c.daysLeft >= 0 && c.daysLeft <= NEAR_DAYS)
    .map(({ id, claimNumber, title, shopCode, deadline, daysLeft }) => ({ id, claimNumber, title, shopCode, deadline, daysLeft }));
  const cover = { baseMonths: DEFAULT_TERMS.base.months, baseHours: DEFAULT_TERMS.base.hours, engineMonths: DEFAULT_TERMS.engine.months, engineHours: DEFAULT_TERMS.engine.hours };
  const page = (daysLeft: number, pageSize: number) => claimQueuePage(db, scope, cover, claimCandidateQuerySchema.parse({ daysLeft, pageSize, sort: "deadline", dir: "asc" }), date);
  const within = await page(NEAR_DAYS, 10);
  const overdue = await page(-1, 10);
  // the queue puts the lines that can still be filed first, nearest first: the first page holds the nearest
  const found = await repairLinesByKeys(db, scope, within.rows.map((r) => r.key));
  const days = new Map(within.rows.map((r) => [r.key, r.claim_days]));
  const nearestLines = found.lines
    .filter((l) => l.closed_date !== null && days.has(String(l.repair_line_key)))
    .map((l) => ({ id: String(l.repair_line_key), roNumber: l.ro_number, lineNo: l.line_no, shopCode: l.shop_code, ...filingDeadline(l.closed_date!, days.get(String(l.repair_line_key))!, date) }))
    .filter((l) => l.daysLeft >= 0)
    .sort((a, b) => a.daysLeft - b.daysLeft || a.roNumber.localeCompare(b.roNumber))
    .slice(0, 5)
    .map(({ id, roNumber, lineNo, shopCode, deadline, daysLeft }) => ({ id, roNumber, lineNo, shopCode, deadline, daysLeft }));
  return {
    canOpenClaims: hasRole(ctx.reader, ...claimRoles),
    groupWide: scope.kind === "all",
    drafts,
    lineCount: within.total - overdue.total,
    nearestLines,
  };
}

/** Shop managers for their own shops (lines and claims of those shops only); directors as group-wide counts. */
export const deadlinesSection: SectionSource<DeadlinesData> = {
  key: "deadlines",
  appliesTo: (r) => (hasRole(r, "manager") && (r.scope.kind === "all" || r.scope.shops.length > 0)) || hasRole(r, "director"),
  load: loadDeadlines,
  build: buildDeadlines,
};
