import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { importPreviewSchema } from "@shared/schemas/imports";
import { profileDetailSchema, profileListSchema, type Profile } from "@shared/schemas/profiles";

export const profileQueries = {
  all: () => ["admin-profiles"] as const,
  list: () => queryOptions({ queryKey: [...profileQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminProfiles(), profileListSchema, signal) }),
  detail: (id: string, version?: number) =>
    queryOptions({
      queryKey: [...profileQueries.all(), "detail", id, version ?? "latest"] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.adminProfile(id, version), profileDetailSchema, signal),
    }),
};

/** An edit saved as the next version (PUT), or a new profile (POST, basedOn null); the list and the profile are read again. */
export function useSaveProfile() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (s: { profile: Profile; basedOn: number | null; note: string; isNew: boolean }) =>
      s.isNew
        ? apiSend("POST", apiPaths.adminProfiles(), { profile: s.profile, basedOn: null, note: s.note }, profileDetailSchema)
        : apiSend("PUT", apiPaths.adminProfile(s.profile.id), { profile: s.profile, basedOn: s.basedOn, note: s.note }, profileDetailSchema),
    onSuccess: () => void qc.invalidateQueries({ queryKey: profileQueries.all() }),
  });
}

const trialSchema = z.object({ profile: z.string(), preview: importPreviewSchema });
export type ProfileTrial = z.infer<typeof trialSchema>;

/** A dry run of a sample file read with an unsaved profile: nothing is stored, not even a batch. */
export function useTryProfile(id: string) {
  return useMutation({
    mutationFn: (t: { profile: Profile; sample: File; shop: string }) => {
      const form = new FormData();
      form.append("profile", JSON.stringify(t.profile));
      if (t.shop) form.append("shop", t.shop);
      form.append("sample", t.sample, t.sample.name);
      return apiSend("POST", apiPaths.adminProfileTest(id), form, trialSchema);
    },
  });
}
