import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { adminShopListSchema, adminShopSchema, type ShopEdit, type ShopEntry } from "@shared/schemas/shops-admin";

export const shopAdminQueries = {
  all: () => ["admin-shops"] as const,
  list: () => queryOptions({ queryKey: [...shopAdminQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminShops(), adminShopListSchema, signal) }),
};

/** A new shop (POST) or the fields of a registered one (PUT by its code); the register is read again after either. */
export type ShopSave = { kind: "add"; shop: ShopEntry } | { kind: "edit"; code: string; shop: ShopEdit };

export function useSaveShop(onSaved?: () => void) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (s: ShopSave) =>
      s.kind === "add" ? apiSend("POST", apiPaths.adminShops(), s.shop, adminShopSchema) : apiSend("PUT", apiPaths.adminShop(s.code), s.shop, adminShopSchema),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: shopAdminQueries.all() });
      onSaved?.();
    },
  });
}
