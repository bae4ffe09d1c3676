import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { capturedMailListSchema, claimCandidatePageSchema, claimDetailSchema, claimListSchema, claimPreviewSchema, type CreateClaim, type StatusChangeBody } from "@shared/schemas/claims";
import { clusterListSchema } from "@shared/schemas/analytics-clusters";

export const claimQueries = {
  all: () => ["claims"] as const,
  list: () => queryOptions({ queryKey: [...claimQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.claims(), claimListSchema, signal) }),
  detail: (id: string) =>
    queryOptions({ queryKey: [...claimQueries.all(), "detail", id] as const, queryFn: ({ signal }) => apiGet(apiPaths.claim(id), claimDetailSchema, signal) }),
  /** the claim as it would be made: `search` holds repairLine=… or cluster=… */
  preview: (search: string) =>
    queryOptions({ queryKey: [...claimQueries.all(), "preview", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.claimPreview(search), claimPreviewSchema, signal) }),
  /** one page of the queue: `search` holds page, pageSize, sort, dir and the filters */
  candidates: (search = "") =>
    queryOptions({ queryKey: [...claimQueries.all(), "candidates", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.claimCandidates(search), claimCandidatePageSchema, signal) }),
  clusterChoices: () =>
    queryOptions({ queryKey: [...claimQueries.all(), "cluster-choices"] as const, queryFn: ({ signal }) => apiGet(apiPaths.claimClusterChoices(), clusterListSchema, signal), staleTime: 5 * 60_000 }),
  capturedMail: () => queryOptions({ queryKey: ["admin-mail"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminMail(), capturedMailListSchema, signal) }),
};

export function useCreateClaim() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateClaim) => apiSend("POST", apiPaths.claims(), body, claimDetailSchema),
    onSuccess: (c) => {
      qc.setQueryData(claimQueries.detail(c.id).queryKey, c);
      void qc.invalidateQueries({ queryKey: claimQueries.all() });
    },
  });
}

/** Mutations on one claim; each answers the claim as it now stands, which replaces the cached detail. */
export function useClaimActions(id: string) {
  const qc = useQueryClient();
  const settle = (c: z.output<typeof claimDetailSchema>) => {
    qc.setQueryData(claimQueries.detail(id).queryKey, c);
    void qc.invalidateQueries({ queryKey: claimQueries.list().queryKey });
  };
  return {
    move: useMutation({ mutationFn: (body: StatusChangeBody) => apiSend("POST", apiPaths.claimStatus(id), body, claimDetailSchema), onSuccess: settle }),
    upload: useMutation({
      mutationFn: (file: File) => {
        const form = new FormData();
        form.append("file", file);
        return apiSend("POST", apiPaths.claimAttachments(id), form, claimDetailSchema);
      },
      onSuccess: settle,
    }),
    send: useMutation({ mutationFn: () => apiSend("POST", apiPaths.claimSend(id), {}, claimDetailSchema), onSuccess: settle }),
  };
}
