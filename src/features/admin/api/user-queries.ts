import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { adminUserListSchema } from "@shared/schemas/admin";
import { apiPaths } from "@shared/api-paths";

export const userQueries = {
  all: () => ["admin-users"] as const,
  list: () => queryOptions({ queryKey: [...userQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(apiPaths.adminUsers(), adminUserListSchema, signal) }),
};
