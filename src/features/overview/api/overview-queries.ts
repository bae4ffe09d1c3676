import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { overviewSchema, type Overview } from "@shared/schemas/overview";

/** An answer (or its clusters) computed for data older than the server's, kept while the new one is computed. */
export const overviewUpdating = (o: Overview | undefined): boolean => o?.asOf?.current === false || o?.clusters.asOf?.current === false;

export const overviewQueries = {
  all: () => ["overview"] as const,
  current: () =>
    queryOptions({
      queryKey: [...overviewQueries.all(), "current"] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.overview(), overviewSchema, signal),
      staleTime: 5 * 60_000,
      // while the server answers from before a load, ask again until the new answer is in
      refetchInterval: (q) => (overviewUpdating(q.state.data) ? 3000 : false),
    }),
};
