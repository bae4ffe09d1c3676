/**
 * Money claimed, paid and written off, and the queue's buckets by urgency. A claim and its corrected versions
 * count once, as their latest filed version stands.
 */
import type { ClaimBucket, ClaimBuckets, ClaimMoney, MoneyRow } from "../../../shared/schemas/claim-lifecycle.js";
import type { ClaimStatus } from "../../../shared/schemas/claims.js";

export interface MoneyClaim {
  id: string;
  previousId: string | null;
  revision: number;
  status: ClaimStatus;
  engineFamily: string;
  amountClaimed: number | null;
  amountPaid: number | null;
  amountCredited: number | null;
  /** the day it went out (null while a draft) */
  filedOn: string | null;
}

const cents = (x: number | null) => (x === null ? 0 : Math.round(x * 100));

/** Which bucket of the queue a claim belongs to: to file, waiting for the maker, rejected and open, or closed. */
export function bucketOf(status: ClaimStatus, supersededBy: string | null): ClaimBucket {
  if (supersededBy) return "closed";
  if (status === "draft") return "toFile";
  if (status === "submitted") return "waiting";
  if (status === "rejected") return "rejected";
  return "closed";
}

/** Counts and money at stake per bucket: the amount each claim asks for (a draft's as it stands). */
export function bucketTotals(claims: readonly { bucket: ClaimBucket; amountClaimed: number | null }[]): ClaimBuckets {
  const out: Record<ClaimBucket, { count: number; cents: number }> = {
    toFile: { count: 0, cents: 0 },
    waiting: { count: 0, cents: 0 },
    rejected: { count: 0, cents: 0 },
    closed: { count: 0, cents: 0 },
  };
  for (const c of claims) {
    out[c.bucket].count += 1;
    out[c.bucket].cents += cents(c.amountClaimed);
  }
  const pick = (b: ClaimBucket) => ({ count: out[b].count, amount: out[b].cents / 100 });
  return { toFile: pick("toFile"), waiting: pick("waiting"), rejected: pick("rejected"), closed: pick("closed") };
}

interface Family {
  engineFamily: string;
  firstFiledOn: string;
  claimed: number;
  paid: number;
  writtenOff: number;
  open: number;
}

/**
 * Each claim with its versions as one family, as its latest filed version stands: claimed is what that version
 * asked for; paid what the maker credited (or agreed to pay, before the credit); written off is what an accepted
 * or partly accepted claim was not paid, or all of a claim written off; open is what still waits on the maker or
 * on a correction. A family none of whose versions has gone out yet is not counted. All in whole cents.
 */
export function claimFamilies(claims: readonly MoneyClaim[]): Family[] {
  const byId = new Map(claims.map((c) => [c.id, c]));
  const rootOf = (c: MoneyClaim): string => {
    let x = c;
    for (let i = 0; x.previousId && byId.has(x.previousId) && i < 1000; i++) x = byId.get(x.previousId)!;
    return x.id;
  };
  const groups = new Map<string, MoneyClaim[]>();
  for (const c of claims) groups.set(rootOf(c), [...(groups.get(rootOf(c)) ?? []), c]);
  const families: Family[] = [];
  for (const versions of groups.values()) {
    const filed = versions.filter((v) => v.filedOn !== null).sort((a, b) => a.revision - b.revision);
    if (filed.length === 0) continue;
    const latest = filed.at(-1)!;
    const newest = [...versions].sort((a, b) => a.revision - b.revision).at(-1)!;
    const claimed = cents(latest.amountClaimed);
    let paid = 0;
    let writtenOff = 0;
    let open = 0;
    if (latest.status === "accepted" || latest.status === "partly_accepted" || latest.status === "credited") {
      paid = cents(latest.amountCredited ?? latest.amountPaid ?? latest.amountClaimed);
      writtenOff = Math.max(0, claimed - paid);
    } else if (latest.status === "written_off") {
      writtenOff = claimed;
    } else {
      // submitted, rejected (open for a correction) or a correction still in draft
      open = claimed;
    }
    families.push({ engineFamily: newest.engineFamily, firstFiledOn: filed[0].filedOn!, claimed, paid, writtenOff, open });
  }
  return families;
}

function rows(families: readonly Family[], keyOf: (f: Family) => string): MoneyRow[] {
  const m = new Map<string, MoneyRow>();
  for (const f of families) {
    const k = keyOf(f);
    const r = m.get(k) ?? { key: k, claims: 0, claimed: 0, paid: 0, writtenOff: 0, open: 0 };
    r.claims += 1;
    r.claimed += f.claimed;
    r.paid += f.paid;
    r.writtenOff += f.writtenOff;
    r.open += f.open;
    m.set(k, r);
  }
  return [...m.values()].sort((a, b) => a.key.localeCompare(b.key)).map((r) => ({ ...r, claimed: r.claimed / 100, paid: r.paid / 100, writtenOff: r.writtenOff / 100, open: r.open / 100 }));
}

/** Claimed, paid, written off and still open, by the month each claim first went out and by engine family. */
export function moneyReport(claims: readonly MoneyClaim[]): ClaimMoney {
  const families = claimFamilies(claims);
  const total = rows(families, () => "all")[0] ?? { key: "all", claims: 0, claimed: 0, paid: 0, writtenOff: 0, open: 0 };
  return {
    basis:
      "Each claim counts once with its corrected versions, as its latest filed version stands, in the month it first went out. Paid is what the maker credited or agreed to pay; written off is what an accepted claim was not paid, or all of a claim written off; open still waits on the maker or on a correction. Drafts never filed are not counted.",
    byMonth: rows(families, (f) => f.firstFiledOn.slice(0, 7)),
    byEngineFamily: rows(families, (f) => f.engineFamily),
    total,
  };
}
