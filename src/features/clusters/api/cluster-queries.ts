import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { clusterDetailSchema, clusterListSchema } from "@shared/schemas/analytics-clusters";

/** The filters' search with the temperature unit the words are to be written in. */
const inUnit = (search: string, unit: "C" | "F") => (search ? `${search}&unit=${unit}` : `unit=${unit}`);

/** `search` carries the shared filters, so a cluster id is looked up in the same scan the list showed; `unit` the words' temperature unit. */
export const clusterQueries = {
  all: () => ["clusters"] as const,
  list: (search: string, unit: "C" | "F" = "C") =>
    queryOptions({
      queryKey: [...clusterQueries.all(), "list", search, unit] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.clusters(inUnit(search, unit)), clusterListSchema, signal),
      staleTime: 5 * 60_000,
    }),
  detail: (id: string, search: string, unit: "C" | "F" = "C") =>
    queryOptions({
      queryKey: [...clusterQueries.all(), "detail", id, search, unit] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.cluster(id, inUnit(search, unit)), clusterDetailSchema, signal),
      staleTime: 5 * 60_000,
    }),
};
