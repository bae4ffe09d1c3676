import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { shopListSchema } from "@shared/schemas/shops";

export const shopQueries = {
  all: () => ["shops"] as const,
  list: () => queryOptions({ queryKey: [...shopQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.shops(), shopListSchema, signal), staleTime: 10 * 60_000 }),
};
