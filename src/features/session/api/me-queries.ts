import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { sessionStateSchema, type Me } from "@shared/schemas/me";
import { apiPaths } from "@shared/api-paths";

export const meQueries = {
  all: () => ["me"] as const,
  /** The signed-in user, or null when there is no session. */
  current: () =>
    queryOptions({
      queryKey: [...meQueries.all(), "current"] as const,
      queryFn: async ({ signal }): Promise<Me | null> => (await apiGet(apiPaths.session(), sessionStateSchema, signal)).user,
      staleTime: 60_000,
    }),
};
