import { useMemo } from "react";
import { useSearchParams } from "react-router-dom";
import { benchmarkQuerySchema } from "@shared/schemas/benchmarks";
import { lineKpiSchema } from "@shared/schemas/benchmark-details";
import type { BenchmarkParams } from "../api/benchmark-queries";

/** The period and comeback window a URL's search params hold; invalid values fall back to the defaults. */
export function readBenchmarkParams(search: URLSearchParams): BenchmarkParams {
  const raw = { period: search.get("period") ?? undefined, at: search.get("at") ?? undefined, days: search.get("days") ?? undefined, hours: search.get("hours") ?? undefined };
  const parsed = benchmarkQuerySchema.safeParse(raw);
  const q = parsed.success ? parsed.data : benchmarkQuerySchema.parse({});
  return { period: q.period, at: q.at, days: q.days, hours: q.hours };
}

/**
 * The page's period, comeback window and drill-down live in the URL, so a link reproduces the view.
 * Invalid values fall back to the defaults instead of failing the page.
 */
export function useBenchmarkParams() {
  const [search, setSearch] = useSearchParams();
  const params = useMemo(() => readBenchmarkParams(search), [search]);
  const drill = search.get("shop") ?? undefined;
  const technician = search.get("tech") ?? undefined;
  const parsedKpi = lineKpiSchema.safeParse(search.get("kpi"));
  /** the KPI whose lines are open; none: the comeback pairs */
  const kpi = parsedKpi.success ? parsedKpi.data : undefined;
  const update = (next: Record<string, string | number | undefined>) => {
    const merged = new URLSearchParams(search);
    for (const [k, v] of Object.entries(next)) {
      if (v === undefined || v === "") merged.delete(k);
      else merged.set(k, String(v));
    }
    setSearch(merged, { replace: true });
  };
  return { params, drill, technician, kpi, update };
}
