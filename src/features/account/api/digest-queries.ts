import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { digestApiPath, digestPageSchema, type DigestPreference } from "@shared/schemas/digest";

export const digestQueries = {
  all: () => ["digest"] as const,
  /** The user's own digest choice and this week's digest as it would read now. */
  current: () => queryOptions({ queryKey: [...digestQueries.all(), "current"] as const, queryFn: ({ signal }) => apiGet(digestApiPath, digestPageSchema, signal) }),
};

/** Saves the user's digest choice; the answer carries the page afresh. */
export function useSaveDigestPreference() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (p: DigestPreference) => apiSend("PUT", digestApiPath, p, digestPageSchema),
    onSuccess: (answer) => qc.setQueryData(digestQueries.current().queryKey, answer),
  });
}
