import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { repairDetailSchema, repairListSchema } from "@shared/schemas/repairs";

export const repairQueries = {
  all: () => ["repairs"] as const,
  /** `search`: filters + q + page + pageSize + sort + dir, as the server reads them */
  list: (search: string) =>
    queryOptions({ queryKey: [...repairQueries.all(), "list", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.repairs(search), repairListSchema, signal), placeholderData: keepPreviousData }),
  detail: (id: string) =>
    queryOptions({ queryKey: [...repairQueries.all(), "detail", id] as const, queryFn: ({ signal }) => apiGet(apiPaths.repair(id), repairDetailSchema, signal) }),
};
