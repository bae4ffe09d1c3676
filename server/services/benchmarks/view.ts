/**
 * One caller's view of the benchmarks world for a period: the period's months, the claims, the group's sums and
 * rate, and each shop as the caller may see it (named, or one of the other shops, with a volume band).
 */
import type { Db } from "../../db/database.js";
import { warrantyClaimCounts } from "../../db/queries/benchmarks.js";
import { indexClaims, sumCells, type ClaimIndex, type LedgerCell } from "../../analytics/benchmark-ledger.js";
import { resolvePeriod, type ResolvedPeriod } from "../../analytics/benchmark-periods.js";
import { shopBands, type Band } from "../../analytics/benchmark-bands.js";
import { groupFigureShown, shownShops, type ShownShop } from "../../analytics/peer-groups.js";
import type { World } from "./world.js";
import { todayIso } from "../../../shared/dates.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { BenchmarkQuery } from "../../../shared/schemas/benchmarks.js";

export interface View {
  world: World;
  resolved: ResolvedPeriod;
  claims: ClaimIndex;
  anyClaims: boolean;
  groupCell: LedgerCell;
  /** the group's comeback rate in the period */
  p0: number | null;
  /** volume band per shop code: exact-count bands for named shops, merged so no peer stands alone for peers */
  bands: Map<string, Band>;
  /** the shops in the order the caller sees them */
  shops: ShownShop[];
  groupWide: boolean;
  /** the group's totals and rates may be shown (analytics/peer-groups.ts groupFigureShown); false → p0 is null */
  groupShown: boolean;
}

/** A scope as a key: "*" for the group, else its shop codes. */
export const scopeKey = (scope: ShopScope): string => (scope.kind === "all" ? "*" : [...scope.shops].sort().join(","));

export async function loadView(db: Db, world: World, scope: ShopScope, q: BenchmarkQuery): Promise<View> {
  const resolved = resolvePeriod(q.period, q.at, world.asOf, world.firstMonth, q.days);
  const claimRows = await warrantyClaimCounts(db, todayIso());
  const claims = indexClaims(claimRows, world.countedThrough);
  const groupCell = sumCells(world.ledger, world.shops.map((s) => s.code), resolved.months, claims);
  const peerCodes = world.shops.filter((s) => !s.inScope).map((s) => s.code);
  const withLines = (code: string) => [code, sumCells(world.ledger, [code], resolved.months, claims).lines] as const;
  const othersWithData = peerCodes.filter((code) => {
    const c = sumCells(world.ledger, [code], resolved.months, claims);
    return c.lines + c.effLines + c.partLines + c.coldStartJobs + c.claims > 0;
  }).length;
  const groupShown = groupFigureShown(scope.kind === "all", othersWithData);
  const bands = shopBands(world.shops.filter((s) => s.inScope).map((s) => withLines(s.code)), peerCodes.map(withLines));
  return {
    world,
    resolved,
    claims,
    anyClaims: claimRows.length > 0,
    groupCell,
    p0: groupShown && groupCell.lines > 0 ? groupCell.withComeback / groupCell.lines : null,
    bands,
    shops: shownShops(world.shops),
    groupWide: scope.kind === "all",
    groupShown,
  };
}
