import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { clusterDetailSchema, clusterListSchema } from "@shared/schemas/analytics-clusters";

/** `search` carries the shared filters, so a cluster id is looked up in the same scan the list showed. */
export const clusterQueries = {
  all: () => ["clusters"] as const,
  list: (search: string) =>
    queryOptions({ queryKey: [...clusterQueries.all(), "list", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.clusters(search), clusterListSchema, signal), staleTime: 5 * 60_000 }),
  detail: (id: string, search: string) =>
    queryOptions({ queryKey: [...clusterQueries.all(), "detail", id, search] as const, queryFn: ({ signal }) => apiGet(apiPaths.cluster(id, search), clusterDetailSchema, signal), staleTime: 5 * 60_000 }),
};
