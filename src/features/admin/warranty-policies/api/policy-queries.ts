import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { policyDetailSchema, policyListSchema, type PolicyTerms } from "@shared/schemas/warranty-policies";

export const policyQueries = {
  all: () => ["admin-warranty-policies"] as const,
  list: () => queryOptions({ queryKey: [...policyQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminWarrantyPolicies(), policyListSchema, signal) }),
  detail: (family: string, version?: number) =>
    queryOptions({
      queryKey: [...policyQueries.all(), "detail", family, version ?? "latest"] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.adminWarrantyPolicy(family, version), policyDetailSchema, signal),
    }),
};

/** An edit saved as the family's next version (PUT, with the version it started from); the list and the policy are read again. */
export function useSavePolicy() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (s: { family: string; policy: PolicyTerms; basedOn: number; note: string }) =>
      apiSend("PUT", apiPaths.adminWarrantyPolicy(s.family), { policy: s.policy, basedOn: s.basedOn, note: s.note }, policyDetailSchema),
    onSuccess: () => void qc.invalidateQueries({ queryKey: policyQueries.all() }),
  });
}
