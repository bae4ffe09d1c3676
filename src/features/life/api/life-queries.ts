import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { costMcfResponseSchema, kaplanMeierResponseSchema, mcfResponseSchema, weibullResponseSchema } from "@shared/schemas/analytics-life";

export const lifeQueries = {
  all: () => ["life"] as const,
  weibull: (search: string) =>
    queryOptions({ queryKey: [...lifeQueries.all(), "weibull", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.life("weibull", search), weibullResponseSchema, signal) }),
  kaplanMeier: (search: string) =>
    queryOptions({ queryKey: [...lifeQueries.all(), "kaplan-meier", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.life("kaplan-meier", search), kaplanMeierResponseSchema, signal) }),
  mcf: (search: string) =>
    queryOptions({ queryKey: [...lifeQueries.all(), "mcf", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.life("mcf", search), mcfResponseSchema, signal) }),
  costMcf: (search: string) =>
    queryOptions({ queryKey: [...lifeQueries.all(), "cost-mcf", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.lifeCostMcf(search), costMcfResponseSchema, signal) }),
};
