import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { componentRatesSchema, costRatesSchema, hourBandRatesSchema, monthlyRatesSchema, rateComparisonSchema, temperatureBandRatesSchema } from "@shared/schemas/analytics-rates";

/** The filters' search with the temperature unit the answer's bands are to be in (°C, the default, left out: the URL the answer warm-up asks for). */
const withUnit = (search: string, unit: "C" | "F") => (unit === "C" ? search : search ? `${search}&unit=${unit}` : `unit=${unit}`);

export const rateQueries = {
  all: () => ["rates"] as const,
  hourBands: (search: string) =>
    queryOptions({ queryKey: [...rateQueries.all(), "hour-bands", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.rates("hour-bands", search), hourBandRatesSchema, signal) }),
  /** grouped by the bands of `unit` (the user's temperature unit) */
  temperatureBands: (search: string, unit: "C" | "F") =>
    queryOptions({ queryKey: [...rateQueries.all(), "temperature-bands", search, unit] as const, queryFn: ({ signal }) => apiGet(apiPaths.rates("temperature-bands", withUnit(search, unit)), temperatureBandRatesSchema, signal) }),
  components: (search: string) =>
    queryOptions({ queryKey: [...rateQueries.all(), "components", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.rates("components", search), componentRatesSchema, signal) }),
  monthly: (search: string) =>
    queryOptions({ queryKey: [...rateQueries.all(), "monthly", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.rates("monthly", search), monthlyRatesSchema, signal) }),
  /** `search` holds compareBy, a, b, component and the filters */
  compare: (search: string) =>
    queryOptions({ queryKey: [...rateQueries.all(), "compare", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.rateCompare(search), rateComparisonSchema, signal) }),
  costs: (search: string) =>
    queryOptions({ queryKey: [...rateQueries.all(), "costs", search] as const, queryFn: ({ signal }) => apiGet(apiPaths.costRates(search), costRatesSchema, signal) }),
};
