import { useMemo } from "react";
import { useSearchParams } from "react-router-dom";
import { analyticsFiltersSchema, filtersToSearchParams, type AnalyticsFilters } from "@shared/schemas/analytics-filters";

const FILTER_KEYS = ["from", "to", "shops", "engineFamilies", "modelLines", "components", "buildFrom", "buildTo", "lots", "tempBands", "hourBands"] as const;

const FILTER_LABELS: Record<string, string> = {
  from: "From", to: "To", shops: "Shops", engineFamilies: "Engine family", modelLines: "Model line", components: "Component",
  buildFrom: "Built from", buildTo: "Built to", lots: "Supplier lot", tempBands: "Temperature band", hourBands: "Engine-hour band",
};

/** The filters a URL holds: the temperature unit is not one of them (it is the user's, useTemperatureUnit). */
export type UrlFilters = Omit<AnalyticsFilters, "unit">;

/**
 * The shared filters a URL's search params hold, and the query string the analytics API reads them from.
 * Read by hand rather than with a URL-state library: the shared zod schema the server validates them with does the parsing.
 * The search carries no unit: a query whose answer is grouped by temperature band adds the user's.
 */
export function readFilters(params: URLSearchParams): { filters: UrlFilters; search: string; problems: string[]; typed: Partial<Record<"from" | "to" | "buildFrom" | "buildTo", string>> } {
  const raw = Object.fromEntries(FILTER_KEYS.map((k) => [k, params.get(k) ?? undefined]));
  let parsed = analyticsFiltersSchema.safeParse(raw);
  const problems: string[] = [];
  if (!parsed.success) {
    // what cannot be read is left out and said in words; the rest still applies (a window's two ends go together)
    const bad = new Set(parsed.error.issues.map((i) => String(i.path[0] ?? "")));
    if (bad.has("to")) bad.add("from");
    if (bad.has("buildTo")) bad.add("buildFrom");
    for (const i of parsed.error.issues) {
      const key = String(i.path[0] ?? "");
      const window = key === "to" || key === "buildTo";
      problems.push(window ? `${i.message}: the dates are not applied.` : `${FILTER_LABELS[key] ?? key}: ${i.message}; not applied.`);
    }
    parsed = analyticsFiltersSchema.safeParse(Object.fromEntries(Object.entries(raw).filter(([k]) => !bad.has(k))));
  }
  const { unit: _unit, ...filters } = parsed.success ? parsed.data : analyticsFiltersSchema.parse({});
  const typed = { from: raw.from, to: raw.to, buildFrom: raw.buildFrom, buildTo: raw.buildTo };
  return { filters, search: filtersToSearchParams(filters).toString(), problems, typed };
}

/**
 * The shared analytics filters live in the URL search params, so a link reproduces a view and the filters
 * carry across pages. Invalid params are dropped, not fatal.
 */
export function useFilters(): ReturnType<typeof readFilters> & { setFilters: (next: Partial<UrlFilters>) => void } {
  const [params, setParams] = useSearchParams();
  const read = useMemo(() => readFilters(params), [params]);
  // only the keys given change: a value typed in one field (even one not applied yet) stays while another is set
  const setFilters = (next: Partial<UrlFilters>) => {
    const p = new URLSearchParams(params);
    for (const k of Object.keys(next)) p.delete(k);
    for (const [k, v] of filtersToSearchParams(next)) p.set(k, v);
    setParams(p, { replace: true });
  };
  return { ...read, setFilters };
}
