import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { settingsSchema } from "@shared/schemas/settings";

export const settingsQueries = {
  all: () => ["settings"] as const,
  /** The group's settings (its currency); they change only when an administrator saves them, which invalidates this. */
  current: () => queryOptions({ queryKey: [...settingsQueries.all(), "current"] as const, queryFn: ({ signal }) => apiGet(apiPaths.settings(), settingsSchema, signal), staleTime: 10 * 60_000 }),
};
