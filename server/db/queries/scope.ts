import type { ShopScope } from "../../../shared/schemas/me.js";

/**
 * The shop codes a scope restricts to, or null for the whole group. Query functions take a ShopScope
 * as a required argument and apply this inside SQL, so a missing scope is a type error, not a leak.
 */
export function scopedShopCodes(scope: ShopScope): string[] | null {
  return scope.kind === "all" ? null : scope.shops;
}

/** True when the scope covers a given shop. */
export function scopeIncludes(scope: ShopScope, shopCode: string): boolean {
  return scope.kind === "all" || scope.shops.includes(shopCode);
}
