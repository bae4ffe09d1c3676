import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { overviewSchema } from "@shared/schemas/overview";

export const overviewQueries = {
  all: () => ["overview"] as const,
  current: () =>
    queryOptions({ queryKey: [...overviewQueries.all(), "current"] as const, queryFn: ({ signal }) => apiGet(apiPaths.overview(), overviewSchema, signal), staleTime: 5 * 60_000 }),
};
