import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { findingStateListSchema, findingWorkSchema, type FindingChange } from "@shared/schemas/findings";

export const findingQueries = {
  all: () => ["findings"] as const,
  states: () => queryOptions({ queryKey: [...findingQueries.all(), "states"] as const, queryFn: ({ signal }) => apiGet(apiPaths.findings(), findingStateListSchema, signal) }),
  work: (key: string) =>
    queryOptions({ queryKey: [...findingQueries.all(), "work", key] as const, queryFn: ({ signal }) => apiGet(apiPaths.finding(key), findingWorkSchema, signal), retry: false }),
};

/** A status (with its reason), owner or note: the finding's work and the list's states are read again. */
export function useChangeFinding(key: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (c: FindingChange) => apiSend("POST", apiPaths.finding(key), c, findingWorkSchema),
    onSuccess: (w) => {
      qc.setQueryData(findingQueries.work(key).queryKey, w);
      void qc.invalidateQueries({ queryKey: findingQueries.states().queryKey });
      void qc.invalidateQueries({ queryKey: ["overview"] });
    },
  });
}
