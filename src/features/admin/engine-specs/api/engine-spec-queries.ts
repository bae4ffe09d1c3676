import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { engineSpecDetailSchema, engineSpecListSchema, engineSpecPaths, type EngineSpecInput } from "@shared/schemas/engine-specs";

export const engineSpecAdminQueries = {
  all: () => ["admin-engine-specs"] as const,
  list: () => queryOptions({ queryKey: [...engineSpecAdminQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(engineSpecPaths.adminList(), engineSpecListSchema, signal) }),
  detail: (family: string) =>
    queryOptions({
      queryKey: [...engineSpecAdminQueries.all(), "detail", family] as const,
      queryFn: ({ signal }) => apiGet(engineSpecPaths.admin(family), engineSpecDetailSchema, signal),
      enabled: family !== "",
    }),
};

/** The figures saved as the family's next version (PUT, with the version the edit started from); lists and the figures the readings use are read again. */
export function useSaveEngineSpec() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (s: { family: string; spec: EngineSpecInput; basedOn: number | null; note: string }) =>
      apiSend("PUT", engineSpecPaths.admin(s.family), { spec: s.spec, basedOn: s.basedOn, note: s.note }, engineSpecDetailSchema),
    onSuccess: (_d, s) => {
      void qc.invalidateQueries({ queryKey: engineSpecAdminQueries.all() });
      void qc.invalidateQueries({ queryKey: ["engine-spec", s.family] });
      void qc.invalidateQueries({ queryKey: ["bench-sheet"] });
    },
  });
}
