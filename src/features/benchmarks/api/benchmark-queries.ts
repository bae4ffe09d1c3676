import { queryOptions } from "@tanstack/react-query";
import { apiGet } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { benchmarkLinesSchema, fixCycleSchema, waitsSchema, type LineKpi } from "@shared/schemas/benchmark-details";
import { comebackPairsSchema, funnelSchema, shopBenchmarksSchema, trendSchema, type PeriodKind } from "@shared/schemas/benchmarks";

export interface BenchmarkParams {
  period: PeriodKind;
  at?: string;
  days: number;
  hours: number;
}

export const benchmarkQueries = {
  all: () => ["benchmarks"] as const,
  shops: (p: BenchmarkParams) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "shops", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("shops", { ...p }), shopBenchmarksSchema, signal) }),
  funnel: (p: BenchmarkParams) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "funnel", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("funnel", { ...p }), funnelSchema, signal) }),
  trend: (p: BenchmarkParams) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "trend", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("trend", { ...p }), trendSchema, signal) }),
  comebacks: (p: BenchmarkParams & { shop: string; technician?: string }) =>
    queryOptions({
      queryKey: [...benchmarkQueries.all(), "comebacks", p] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("comebacks", { ...p }), comebackPairsSchema, signal),
    }),
  lines: (p: BenchmarkParams & { kpi: LineKpi; shop: string; technician?: string }) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "lines", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("lines", { ...p }), benchmarkLinesSchema, signal) }),
  waits: (p: BenchmarkParams) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "waits", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("waits", { ...p }), waitsSchema, signal) }),
  fixCycle: (p: BenchmarkParams) =>
    queryOptions({ queryKey: [...benchmarkQueries.all(), "fix-cycle", p] as const, queryFn: ({ signal }) => apiGet(apiPaths.benchmarks("fix-cycle", { ...p }), fixCycleSchema, signal) }),
};
