import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { engineSpecCurrentSchema, engineSpecPaths } from "@shared/schemas/engine-specs";

/** The engine family's own figures a line's readings are judged against (null: the generic bands). */
export const engineSpecQueries = {
  current: (family: string) =>
    queryOptions({
      queryKey: ["engine-spec", family] as const,
      queryFn: ({ signal }) => apiGet(engineSpecPaths.current(family), engineSpecCurrentSchema, signal),
      enabled: family !== "",
      staleTime: 5 * 60_000,
    }),
};
