import { useQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import type { PrimeCache } from "@/app/page-loader";
import { QueryView } from "@/features/filters/components/query-view";
import { fittingQueries } from "@/features/winter/api/fitting-queries";
import { winterQueries, type ForecastParams } from "@/features/winter/api/winter-queries";
import { readPeriod, type PeriodText } from "@/features/winter/period-input";
import { PeriodControls } from "@/features/winter/components/period-controls";
import { ForecastCard } from "@/features/winter/components/forecast-card";
import { BacktestCard } from "@/features/winter/components/backtest-card";
import { FittingListCard } from "@/features/winter/components/fitting-list-card";

const periodText = (p: URLSearchParams): PeriodText => ({ from: p.get("from") ?? "", to: p.get("to") ?? "", serviceLevel: p.get("serviceLevel") ?? "" });
// a URL typed by hand with a bad value falls back to the defaults; the form says what is wrong when it is submitted
const paramsOf = (t: PeriodText): ForecastParams => readPeriod(t).params ?? {};

export const primeCache: PrimeCache = (qc, { url }) => {
  void qc.prefetchQuery(winterQueries.forecast(paramsOf(periodText(url.searchParams))));
  void qc.prefetchQuery(winterQueries.backtest());
  void qc.prefetchQuery(fittingQueries.list());
};

export function Component() {
  const [search, setSearch] = useSearchParams();
  const text = periodText(search);
  const forecast = useQuery(winterQueries.forecast(paramsOf(text)));
  const backtest = useQuery(winterQueries.backtest());
  const fitting = useQuery(fittingQueries.list());

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Winter readiness</h1>
        <p className="text-muted">
          Before the cold: heater plugs on the shelf before back-orders start, and block heaters fitted while the socket is still clean.
        </p>
      </div>
      <PeriodControls
        key={search.toString()}
        value={text}
        period={forecast.data?.period ?? null}
        onApply={(_p, t) => {
          const next = new URLSearchParams();
          for (const [k, v] of Object.entries(t)) if (v.trim()) next.set(k, v.trim());
          setSearch(next, { replace: true });
        }}
      />
      <QueryView query={forecast} label="the forecast" isEmpty={(d) => d.rows.length === 0} emptyTitle="No cold-start parts to forecast" emptyText="No machine at your shops carries a heater-plug set or grid heater.">
        {(d) => (
          <>
            <ForecastCard forecast={d} />
            <p role="note" className="rounded border border-ochre/60 bg-paper p-3 text-sm">{d.caution}</p>
          </>
        )}
      </QueryView>
      <QueryView query={backtest} label="last winter's check">
        {(d) => <BacktestCard backtest={d} />}
      </QueryView>
      <QueryView query={fitting} label="the block-heater fitting list">
        {(d) => <FittingListCard list={d} />}
      </QueryView>
    </div>
  );
}
