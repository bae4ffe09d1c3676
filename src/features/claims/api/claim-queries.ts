import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { capturedMailListSchema, claimCandidatePageSchema, claimDetailSchema, claimListSchema, claimPreviewSchema, type CreateClaim, type StatusChangeBody } from "@shared/schemas/claims";
import { clusterListSchema } from "@shared/schemas/analytics-clusters";
import { claimMoneySchema, type LineInclusionBody, type ResubmitBody } from "@shared/schemas/claim-lifecycle";
import { claimStorySchema, type Narrative } from "@shared/schemas/claim-story";

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
  /** claimed, paid and written off per month and per engine family */
  money: () => queryOptions({ queryKey: [...claimQueries.all(), "money"] as const, queryFn: ({ signal }) => apiGet(apiPaths.claimMoney(), claimMoneySchema, signal) }),
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
    void qc.invalidateQueries({ queryKey: claimQueries.money().queryKey });
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
    include: useMutation({
      mutationFn: ({ lineId, ...body }: LineInclusionBody & { lineId: string }) => apiSend("POST", apiPaths.claimLineInclusion(id, lineId), body, claimDetailSchema),
      onSuccess: settle,
    }),
    /** answers the new version; the old one is refetched so its "corrected as" link shows */
    resubmit: useMutation({
      mutationFn: (body: ResubmitBody) => apiSend("POST", apiPaths.claimResubmit(id), body, claimDetailSchema),
      onSuccess: (c) => {
        qc.setQueryData(claimQueries.detail(c.id).queryKey, c);
        void qc.invalidateQueries({ queryKey: claimQueries.all() });
      },
    }),
  };
}

/** A claim's narrative and notes (GET /api/claims/:id/story), and saving them. */
export const claimStoryQuery = (id: string) =>
  queryOptions({ queryKey: [...claimQueries.all(), "story", id] as const, queryFn: ({ signal }) => apiGet(apiPaths.claimStory(id), claimStorySchema, signal) });

export function useClaimStory(id: string) {
  const qc = useQueryClient();
  const settle = (s: z.output<typeof claimStorySchema>) => {
    qc.setQueryData(claimStoryQuery(id).queryKey, s);
    void qc.invalidateQueries({ queryKey: claimQueries.detail(id).queryKey });
  };
  return {
    saveNarrative: useMutation({ mutationFn: (n: Narrative) => apiSend("PUT", apiPaths.claimNarrative(id), n, claimStorySchema), onSuccess: settle }),
    addNote: useMutation({ mutationFn: (text: string) => apiSend("POST", apiPaths.claimNotes(id), { text }, claimStorySchema), onSuccess: settle }),
    removeAttachment: useMutation({
      mutationFn: (attachmentId: string) => apiSend("DELETE", apiPaths.claimAttachment(id, attachmentId), {}, claimDetailSchema),
      onSuccess: (c) => qc.setQueryData(claimQueries.detail(id).queryKey, c),
    }),
  };
}
