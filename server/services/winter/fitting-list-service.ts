/** Gathers the block-heater fitting list for a caller's scope. */
import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { FittingList } from "../../../shared/schemas/fitting-list.js";
import { fittingAsOf, fittingCandidates, scopedColdShops } from "../../db/queries/fitting-list.js";
import { todayIso } from "../../../shared/dates.js";
import { blockHeaterCautions, CLEAN_SOCKET_MONTHS, coldRuleText, fittingList, orderRuleText } from "./fitting-list.js";

/** The list on the last day with data (today when there is none), for the cold shops in `scope` only. */
export async function loadFittingList(db: Db, scope: ShopScope): Promise<FittingList> {
  const [asOf, shops] = await Promise.all([fittingAsOf(db), scopedColdShops(db, scope)]);
  const day = asOf ?? todayIso();
  const candidates = await fittingCandidates(db, shops.cold.map((s) => s.code), day);
  return {
    asOf: day,
    coldShops: shops.cold,
    otherShops: shops.other,
    coldRule: coldRuleText,
    orderRule: orderRuleText,
    cleanSocketMonths: CLEAN_SOCKET_MONTHS,
    rows: fittingList(candidates, day),
    cautions: blockHeaterCautions(),
  };
}
