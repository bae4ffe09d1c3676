import { useMemo } from "react";
import { useFormat } from "@/lib/use-format";
import { benchmarkFormat, type BenchmarkFormat } from "../format";

/** The benchmarks' figure words in the reader's locale (useFormat). */
export function useBenchmarkFormat(): BenchmarkFormat {
  const f = useFormat();
  return useMemo(() => benchmarkFormat(f), [f]);
}
