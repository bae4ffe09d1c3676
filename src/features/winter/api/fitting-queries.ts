import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { fittingListSchema } from "@shared/schemas/fitting-list";

/** Where the fitting list lives: JSON, and the CSV and PDF downloads. */
export const fittingPaths = {
  list: () => "/api/winter/fitting",
  csv: () => "/api/winter/fitting/list.csv",
  pdf: () => "/api/winter/fitting/list.pdf",
};

export const fittingQueries = {
  all: () => ["winter-fitting"] as const,
  list: () => queryOptions({ queryKey: [...fittingQueries.all(), "list"] as const, queryFn: ({ signal }) => apiGet(fittingPaths.list(), fittingListSchema, signal) }),
};
