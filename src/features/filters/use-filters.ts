import { useMemo } from "react";
import { useSearchParams } from "react-router-dom";
import { analyticsFiltersSchema, filtersToSearchParams, type AnalyticsFilters } from "@shared/schemas/analytics-filters";

const FILTER_KEYS = ["from", "to", "shops", "engineFamilies", "modelLines", "components", "buildFrom", "buildTo", "lots", "tempBands", "hourBands"] as const;

/** The filters a URL holds: the temperature unit is not one of them (it is the user's, useTemperatureUnit). */
export type UrlFilters = Omit<AnalyticsFilters, "unit">;

/**
 * The shared filters a URL's search params hold, and the query string the analytics API reads them from.
 * Read by hand rather than with a URL-state library: the shared zod schema the server validates them with does the parsing.
 * The search carries no unit: a query whose answer is grouped by temperature band adds the user's.
 */
export function readFilters(params: URLSearchParams): { filters: UrlFilters; search: string } {
  const raw = Object.fromEntries(FILTER_KEYS.map((k) => [k, params.get(k) ?? undefined]));
  const parsed = analyticsFiltersSchema.safeParse(raw);
  const { unit: _unit, ...filters } = parsed.success ? parsed.data : analyticsFiltersSchema.parse({});
  return { filters, search: filtersToSearchParams(filters).toString() };
}

/**
 * The shared analytics filters live in the URL search params, so a link reproduces a view and the filters
 * carry across pages. Invalid params are dropped, not fatal.
 */
export function useFilters(): { filters: UrlFilters; search: string; setFilters: (next: Partial<UrlFilters>) => void } {
  const [params, setParams] = useSearchParams();
  const { filters, search } = useMemo(() => readFilters(params), [params]);
  const setFilters = (next: Partial<UrlFilters>) => {
    const merged = filtersToSearchParams({ ...filters, ...next });
    for (const [k, v] of params) if (!(FILTER_KEYS as readonly string[]).includes(k)) merged.set(k, v);
    setParams(merged, { replace: true });
  };
  return { filters, search, setFilters };
}
