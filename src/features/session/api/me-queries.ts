import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { meSchema, type Me } from "@shared/schemas/me";
import { apiPaths } from "@shared/api-paths";

export const meQueries = {
  all: () => ["me"] as const,
  /** The signed-in user, or null when there is no session (401). */
  current: () =>
    queryOptions({
      queryKey: [...meQueries.all(), "current"] as const,
      queryFn: async ({ signal }): Promise<Me | null> => {
        try {
          return await apiGet(apiPaths.me(), meSchema, signal);
        } catch (err) {
          if (err instanceof ApiError && err.status === 401) return null;
          throw err;
        }
      },
      staleTime: 60_000,
    }),
};
