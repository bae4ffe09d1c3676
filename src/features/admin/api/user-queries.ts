import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { adminUserListSchema, adminUserSchema, userHistorySchema, type UserAccess } from "@shared/schemas/admin";
import { apiPaths } from "@shared/api-paths";

export const userQueries = {
  all: () => ["admin-users"] as const,
  list: () => queryOptions({ queryKey: [...userQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminUsers(), adminUserListSchema, signal) }),
  history: (sub: string) =>
    queryOptions({ queryKey: [...userQueries.all(), "history", sub] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminUserHistory(sub), userHistorySchema, signal) }),
};

/** One change to a user's access; the list and the user's history are read again after it. */
export type UserChange =
  | { kind: "access"; sub: string; access: UserAccess }
  | { kind: "provider"; sub: string }
  | { kind: "deactivate"; sub: string }
  | { kind: "reactivate"; sub: string };

export function useChangeUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (c: UserChange) => {
      switch (c.kind) {
        case "access":
          return apiSend("PUT", apiPaths.adminUserAccess(c.sub), c.access, adminUserSchema);
        case "provider":
          return apiSend("DELETE", apiPaths.adminUserAccess(c.sub), undefined, adminUserSchema);
        case "deactivate":
          return apiSend("POST", apiPaths.adminUserDeactivate(c.sub), {}, adminUserSchema);
        case "reactivate":
          return apiSend("POST", apiPaths.adminUserReactivate(c.sub), {}, adminUserSchema);
      }
    },
    onSuccess: () => void qc.invalidateQueries({ queryKey: userQueries.all() }),
  });
}
