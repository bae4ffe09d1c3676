import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { settingsQueries } from "@/lib/settings-queries";
import { apiPaths } from "@shared/api-paths";
import { adminSettingsSchema, type SettingsEdit } from "@shared/schemas/settings";

export const settingsAdminQueries = {
  all: () => ["admin-settings"] as const,
  current: () => queryOptions({ queryKey: [...settingsAdminQueries.all(), "current"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminSettings(), adminSettingsSchema, signal) }),
};

/** Saves the group's settings; every page's formatting reads the saved currency at once. */
export function useSaveSettings() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (edit: SettingsEdit) => apiSend("PUT", apiPaths.adminSettings(), edit, adminSettingsSchema),
    onSuccess: (answer) => {
      qc.setQueryData(settingsAdminQueries.current().queryKey, answer);
      qc.setQueryData(settingsQueries.current().queryKey, answer.settings);
    },
  });
}
