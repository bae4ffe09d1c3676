import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { z } from "zod";
import { winterBacktestSchema, winterForecastSchema, winterStockSchema, type WinterStockInput } from "@shared/schemas/winter";

/** The forecast's inputs as the page holds them; undefined leaves the server's default (the winter ahead, 90 %). */
export interface ForecastParams {
  from?: string;
  to?: string;
  serviceLevel?: number;
}

const search = (p: ForecastParams) => {
  const q = new URLSearchParams();
  if (p.from) q.set("from", p.from);
  if (p.to) q.set("to", p.to);
  if (p.serviceLevel !== undefined) q.set("serviceLevel", String(p.serviceLevel));
  return q.size ? `?${q}` : "";
};

export const winterPaths = {
  forecast: (p: ForecastParams) => `/api/winter/forecast${search(p)}`,
  backtest: () => "/api/winter/backtest",
  stock: () => "/api/winter/stock",
};

export const winterQueries = {
  all: () => ["winter"] as const,
  forecast: (p: ForecastParams) =>
    queryOptions({
      queryKey: [...winterQueries.all(), "forecast", p.from ?? null, p.to ?? null, p.serviceLevel ?? null] as const,
      queryFn: ({ signal }) => apiGet(winterPaths.forecast(p), winterForecastSchema, signal),
    }),
  backtest: () => queryOptions({ queryKey: [...winterQueries.all(), "backtest"] as const, queryFn: ({ signal }) => apiGet(winterPaths.backtest(), winterBacktestSchema, signal) }),
  stock: () => queryOptions({ queryKey: [...winterQueries.all(), "stock"] as const, queryFn: ({ signal }) => apiGet(winterPaths.stock(), winterStockSchema, signal) }),
};

/** Saves one shop's stock on hand of a part; the forecast (its gaps) and the stock are read again after. */
export function useSaveStock() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: WinterStockInput) => apiSend("PUT", winterPaths.stock(), input, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: winterQueries.all() }),
  });
}
