import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ClaimCandidatePage, ClaimCandidateQuery } from "../../../shared/schemas/claims.js";
import { claimQueuePage, linesOutsideQueue, type CoverDefaults } from "../../db/queries/claim-queue.js";
import { DEFAULT_TERMS } from "./eligibility.js";
import { amountOf } from "./evidence.js";
import { evidenceFor } from "./claims-service.js";
import { todayIso } from "../../../shared/dates.js";

const defaults: CoverDefaults = {
  baseMonths: DEFAULT_TERMS.base.months,
  baseHours: DEFAULT_TERMS.base.hours,
  engineMonths: DEFAULT_TERMS.engine.months,
  engineHours: DEFAULT_TERMS.engine.hours,
};

/**
 * One page of the clerk's queue: the lines are chosen, filtered, sorted and counted in SQL; only the page's lines
 * are read as evidence, for their eligibility in words and their filing deadline. A search that names lines not
 * in the queue also says where they are (a claim holds them, the order is open, or they are outside cover).
 */
export async function unclaimedLinesPage(db: Db, scope: ShopScope, q: ClaimCandidateQuery): Promise<ClaimCandidatePage> {
  const today = todayIso();
  const { rows, total } = await claimQueuePage(db, scope, defaults, q, today);
  const byKey = new Map((await evidenceFor(db, scope, rows.map((r) => r.key), today)).map((l) => [l.id, l]));
  const page = rows.flatMap((r) => {
    const l = byKey.get(r.key);
    if (!l || !l.deadline) return [];
    return [
      {
        repairLineId: l.id,
        shopCode: l.shopCode,
        roNumber: l.roNumber,
        lineNo: l.lineNo,
        closedDate: l.closedDate!,
        serial: l.machine.serial,
        modelLine: l.machine.modelLine,
        engineFamily: l.machine.engineFamily,
        component: l.component.name,
        hourMeter: l.hourMeter,
        payType: l.payType,
        amount: amountOf([l]),
        deadline: l.deadline,
        eligibility: l.eligibility.summary,
        verdict: l.eligibility.verdict,
      },
    ];
  });
  const elsewhere = q.q ? await linesOutsideQueue(db, scope, defaults, q.q) : [];
  return { total, page: q.page, pageSize: q.pageSize, rows: page, elsewhere };
}
