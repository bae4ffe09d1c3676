import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { batchListSchema, rejectPageSchema } from "@shared/schemas/imports";

export const batchQueries = {
  all: () => ["batches"] as const,
  /** the load history; `shop` "" = every shop the caller may see */
  list: (shop: string) => queryOptions({ queryKey: [...batchQueries.all(), "list", shop] as const, queryFn: ({ signal }) => apiGet(apiPaths.batches(shop || undefined), batchListSchema, signal) }),
  /** one page of a batch's rejects with its summary; `search` holds reason, offset and limit */
  rejects: (id: string, search: string) =>
    queryOptions({ queryKey: [...batchQueries.all(), "rejects", id, search] as const, queryFn: ({ signal }) => apiGet(apiPaths.batchRejects(id, search), rejectPageSchema, signal) }),
  /** a batch's summary and counts (the rejects answer with one row) */
  summary: (id: string) => batchQueries.rejects(id, "limit=1"),
};
