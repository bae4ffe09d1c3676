/**
 * One caller's view of the benchmarks world for a period: the period's months, the claims, the group's sums and
 * rate, and each shop as the caller may see it (named, or a lettered peer with a volume band).
 */
import type { Db } from "../../db/database.js";
import { warrantyClaimCounts } from "../../db/queries/benchmarks.js";
import { indexClaims, sumCells, type ClaimIndex, type LedgerCell } from "../../analytics/benchmark-ledger.js";
import { resolvePeriod, type ResolvedPeriod } from "../../analytics/benchmark-periods.js";
import { shopBands, type Band } from "../../analytics/benchmark-bands.js";
import { shownShops, type ShownShop } from "../../analytics/benchmark-letters.js";
import { peerLetters } from "./peer-letters.js";
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
}

/** A scope as a key: "*" for the group, else its shop codes. */
export const scopeKey = (scope: ShopScope): string => (scope.kind === "all" ? "*" : [...scope.shops].sort().join(","));

export async function loadView(db: Db, world: World, scope: ShopScope, q: BenchmarkQuery, peerSecret: string): Promise<View> {
  const resolved = resolvePeriod(q.period, q.at, world.asOf, world.firstMonth, q.days);
  const claimRows = await warrantyClaimCounts(db, todayIso());
  const claims = indexClaims(claimRows, world.countedThrough);
  const groupCell = sumCells(world.ledger, world.shops.map((s) => s.code), resolved.months, claims);
  const peerCodes = world.shops.filter((s) => !s.inScope).map((s) => s.code);
  const letters = peerLetters(peerCodes, resolved.period.key, scopeKey(scope), peerSecret);
  const withLines = (code: string) => [code, sumCells(world.ledger, [code], resolved.months, claims).lines] as const;
  const bands = shopBands(world.shops.filter((s) => s.inScope).map((s) => withLines(s.code)), peerCodes.map(withLines));
  return {
    world,
    resolved,
    claims,
    anyClaims: claimRows.length > 0,
    groupCell,
    p0: groupCell.lines > 0 ? groupCell.withComeback / groupCell.lines : null,
    bands,
    shops: shownShops(world.shops, letters),
    groupWide: scope.kind === "all",
  };
}
