import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import { lifeQueries } from "@/features/life/api/life-queries";
import { costMcfChart, kaplanMeierChart, mcfChart, weibullChart } from "@/features/life/charts/life-charts";
import { rateQueries } from "@/features/rates/api/rate-queries";
import { RateComparisonView } from "@/features/rates/components/rate-comparison-view";
import { shopQueries } from "@/features/filters/api/shop-queries";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import { parseBLife, readLifeParams } from "@/features/life/life-params";
import type { PrimeCache } from "@/app/page-loader";
import { ChartCard } from "@/components/chart-card";
import { Card } from "@/components/ui/states";
import { palette } from "@/lib/palette";
import { components, engineFamilies } from "@shared/catalog";
import type { BLife, WeibullResponse } from "@shared/schemas/analytics-life";
import { useFormat } from "@/lib/use-format";

const COMPARISONS = [
  { id: "", label: "No comparison" },
  { id: "lot", label: "A lot against the rest" },
  { id: "engineFamily", label: "One engine family against another" },
  { id: "climate", label: "Cold shops against mild shops" },
  { id: "shop", label: "One shop against another" },
] as const;

type Shown = (v: number | null | undefined) => string;
const interval = (i: { lower: number | null; upper: number | null } | null, f: Shown) => (i ? `${f(i.lower)} – ${f(i.upper)}` : "—");
const field = "mt-1 block rounded border border-line bg-white px-2 py-1 text-sm";
const bLifeText = (b: BLife, h: Shown) => `${h(b.estimate)} (${h(b.lower)} – ${b.upper === null ? "not reached" : h(b.upper)})`;

function FitTable({ d }: { d: WeibullResponse }) {
  const fmt = useFormat();
  const h: Shown = (v) => fmt.quantity("hours", v);
  const r2: Shown = (v) => fmt.quantity("ratio", v);
  const extra = d.groups.map((g) => (g.fit.status === "fitted" ? g.fit.bLife : null)).find((b) => b !== null && b.percent !== 10) ?? null;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <thead className="text-muted">
          <tr className="border-b border-line"><th className="py-1.5 pr-3">Group</th><th className="pr-3 text-right">Units</th><th className="pr-3 text-right">Failures</th><th className="pr-3">β shape (90 %)</th><th className="pr-3">η scale, h (90 %)</th><th className="pr-3">B10 life, h (90 %)</th>{extra && <th>B{extra.percent} life, h (90 %)</th>}</tr>
        </thead>
        <tbody>
          {d.groups.map((g) => (
            <tr key={g.label} className="border-b border-line/60">
              <td className="py-1.5 pr-3 font-semibold">{g.label}</td>
              <td className="pr-3 text-right tabular-nums">{fmt.count(g.fit.units)}</td>
              <td className="pr-3 text-right tabular-nums">{fmt.count(g.fit.failures)}</td>
              {g.fit.status === "fitted" ? (
                <>
                  <td className="pr-3 tabular-nums">{r2(g.fit.shape)} ({interval(g.fit.shapeInterval, r2)})</td>
                  <td className="pr-3 tabular-nums">{h(g.fit.scale)} ({interval(g.fit.scaleInterval, h)})</td>
                  <td className="pr-3 tabular-nums">{h(g.fit.b10)} ({interval(g.fit.b10Interval, h)})</td>
                  {extra && <td className="tabular-nums" data-testid="weibull-b-life">{bLifeText(g.fit.bLife, h)}</td>}
                </>
              ) : (
                <td colSpan={extra ? 4 : 3} className="text-muted">Not fitted: {g.fit.reason}. See the Kaplan–Meier curve below.</td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      {d.comparison && (
        <p className="mt-2 text-sm">
          Scale ratio {r2(d.comparison.scaleRatio.estimate)} ({interval(d.comparison.scaleRatio, r2)}), hazard ratio {r2(d.comparison.hazardRatio.estimate)} under a common β of {r2(d.comparison.commonShape)}; same distribution: likelihood-ratio p {fmt.pValue(d.comparison.sameDistribution.pValue)}; same shape: p {fmt.pValue(d.comparison.sameShape.pValue)}.
        </p>
      )}
    </div>
  );
}

// prefetched, not awaited: maximum-likelihood fits and curves, each of which the page shows as it arrives
export const primeCache: PrimeCache = (qc, { url }) => {
  const { lifeSearch, mcfSearch } = readLifeParams(url.searchParams, readFilters(url.searchParams).search);
  void qc.prefetchQuery(lifeQueries.weibull(lifeSearch));
  void qc.prefetchQuery(lifeQueries.kaplanMeier(lifeSearch));
  void qc.prefetchQuery(lifeQueries.mcf(mcfSearch));
  void qc.prefetchQuery(lifeQueries.costMcf(mcfSearch));
};

export function Component() {
  const fmt = useFormat();
  const { search } = useFilters();
  const [params, setParams] = useSearchParams();
  const { component, compareBy, compareValue, compareOther, mcfComponent, bLife, lifeSearch, mcfSearch, rateCompareSearch } = readLifeParams(params, search);
  const [bLifeError, setBLifeError] = useState<string | null>(null);
  const applyBLife = (text: string) => {
    const parsed = parseBLife(text);
    if ("error" in parsed) return setBLifeError(parsed.error);
    setBLifeError(null);
    set({ bLife: parsed.value === 10 ? "" : String(parsed.value) });
  };
  const set = (next: Record<string, string>) => {
    const p2 = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) (v ? p2.set(k, v) : p2.delete(k));
    setParams(p2, { replace: true });
  };
  const weibull = useQuery(lifeQueries.weibull(lifeSearch));
  const km = useQuery(lifeQueries.kaplanMeier(lifeSearch));
  const recurrences = useQuery(lifeQueries.mcf(mcfSearch));
  const costs = useQuery(lifeQueries.costMcf(mcfSearch));
  const rateComparison = useQuery({ ...rateQueries.compare(rateCompareSearch ?? ""), enabled: rateCompareSearch !== null });
  const shops = useQuery({ ...shopQueries.list(), enabled: compareBy === "shop" });
  const compName = components.find((c) => c.code === component)?.name ?? component;

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Life</h1>
        <p className="text-muted">How long a fitted part lasts in engine hours, survivors counted as still running, and how repairs pile up on a machine.</p>
      </div>
      <FilterBar hide={["components", "tempBands", "hourBands"]} />
      <Card>
        <div className="flex flex-wrap items-end gap-3">
          <label className="text-xs font-semibold uppercase tracking-wide text-muted">Part
            <select className={field} value={component} onChange={(e) => set({ component: e.target.value })}>
              {components.filter((c) => c.code !== "SVC-PM").map((c) => <option key={c.code} value={c.code}>{c.name}</option>)}
            </select>
          </label>
          <label className="text-xs font-semibold uppercase tracking-wide text-muted">Compare
            <select className={field} value={compareBy} onChange={(e) => set({ compareBy: e.target.value, compareValue: e.target.value === "climate" ? "cold" : e.target.value === "engineFamily" ? "K18-3G" : "", compareOther: e.target.value === "climate" ? "mild" : e.target.value === "engineFamily" ? "K26-4R" : "" })}>
              {COMPARISONS.map((c) => <option key={c.id} value={c.id}>{c.label}</option>)}
            </select>
          </label>
          {compareBy === "lot" && (
            <label className="text-xs font-semibold uppercase tracking-wide text-muted">Lot
              <input className={field} defaultValue={compareValue} placeholder="lot code" onBlur={(e) => set({ compareValue: e.target.value.trim() })} onKeyDown={(e) => e.key === "Enter" && set({ compareValue: e.currentTarget.value.trim() })} />
            </label>
          )}
          {compareBy === "engineFamily" && (
            <>
              {(["compareValue", "compareOther"] as const).map((k) => (
                <label key={k} className="text-xs font-semibold uppercase tracking-wide text-muted">{k === "compareValue" ? "Family" : "against"}
                  <select className={field} value={k === "compareValue" ? compareValue : compareOther} onChange={(e) => set({ [k]: e.target.value })}>
                    {engineFamilies.map((f) => <option key={f.code} value={f.code}>{f.code}</option>)}
                  </select>
                </label>
              ))}
            </>
          )}
          {compareBy === "shop" && (
            <>
              {(["compareValue", "compareOther"] as const).map((k) => (
                <label key={k} className="text-xs font-semibold uppercase tracking-wide text-muted">{k === "compareValue" ? "Shop" : "against"}
                  <select className={field} value={k === "compareValue" ? compareValue : compareOther} onChange={(e) => set({ [k]: e.target.value })}>
                    <option value="">{k === "compareValue" ? "choose…" : "all other shops"}</option>
                    {(shops.data?.shops ?? []).map((s) => <option key={s.code} value={s.code}>{s.code} {s.name}</option>)}
                  </select>
                </label>
              ))}
            </>
          )}
          <label className="text-xs font-semibold uppercase tracking-wide text-muted">B-life (B1–B50)
            <span className="mt-1 flex items-center gap-1 text-sm normal-case tracking-normal text-ink">B
              <input
                key={bLife}
                aria-label="B-life percent"
                aria-invalid={bLifeError !== null}
                aria-describedby={bLifeError ? "b-life-error" : undefined}
                inputMode="numeric"
                className="block w-16 rounded border border-line bg-white px-2 py-1 text-sm"
                defaultValue={String(bLife)}
                onBlur={(e) => applyBLife(e.target.value)}
                onKeyDown={(e) => e.key === "Enter" && applyBLife(e.currentTarget.value)}
              />
            </span>
            {bLifeError && <span id="b-life-error" role="alert" className="mt-1 block text-xs normal-case tracking-normal text-red-700">{bLifeError}</span>}
          </label>
        </div>
      </Card>
      {rateCompareSearch !== null && (
        <Card title={`Failure rates compared: ${compName}`}>
          <QueryView query={rateComparison} label="the rate comparison" lines={3}>
            {(d) => <RateComparisonView d={d} />}
          </QueryView>
        </Card>
      )}
      <QueryView query={weibull} label="the Weibull fit" isEmpty={(d) => d.groups.every((g) => g.fit.units === 0)} emptyText={`No ${compName.toLowerCase()} units match these filters.`}>
        {(d) => (
          <ChartCard
            title={`Weibull probability plot: ${compName}`}
            subtitle="Points: each failure at its estimated share failed; line: maximum-likelihood fit; band: 90 % confidence band of the fit"
            options={weibullChart(d, palette, fmt)}
            rows={d.groups.flatMap((g) => g.points.map((pt) => ({ group: g.label, time: pt.time, medianRank: pt.medianRank })))}
            columns={[{ key: "group", label: "Group" }, { key: "time", label: "Engine hours", csvLabel: "Engine hours (h)" }, { key: "medianRank", label: "Estimated share failed", csvLabel: "Estimated share failed (fraction)" }]}
            filename="life-weibull-points.csv"
            footer={<><FitTable d={d} /><p className="mt-2">{d.method}</p></>}
          />
        )}
      </QueryView>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
        <QueryView query={km} label="the Kaplan–Meier curve" isEmpty={(d) => d.groups.every((g) => g.units === 0)} emptyText={`No ${compName.toLowerCase()} units match these filters.`}>
          {(d) => (
            <ChartCard
              title={`Kaplan–Meier: ${compName} still working`}
              subtitle={d.logRank ? `Log-rank test between the groups: p ${fmt.pValue(d.logRank.pValue)}` : `${fmt.count(d.groups[0]?.units)} units, ${fmt.count(d.groups[0]?.failures)} failures`}
              options={kaplanMeierChart(d, palette, fmt)}
              rows={d.groups.flatMap((g) => g.steps.map((s) => ({ group: g.label, ...s })))}
              columns={[{ key: "group", label: "Group" }, { key: "time", label: "Engine hours", csvLabel: "Engine hours (h)" }, { key: "atRisk", label: "At risk" }, { key: "survival", label: "Survival", csvLabel: "Survival (fraction)" }, { key: "lower", label: "95 % lower", csvLabel: "95 % lower (fraction)" }, { key: "upper", label: "95 % upper", csvLabel: "95 % upper (fraction)" }]}
              filename="life-kaplan-meier.csv"
              footer={
                <>
                  <p className="mb-1 text-sm text-ink" data-testid="km-b-life">
                    B{bLife} life read off the curve:{" "}
                    {d.groups.map((g, i) => <span key={g.label}>{i > 0 && "; "}{g.label} {g.bLife.estimate === null ? "not reached" : bLifeText(g.bLife, (v) => fmt.quantity("hours", v))} h</span>)} (95 %)
                  </p>
                  {d.method}
                </>
              }
            />
          )}
        </QueryView>
        <QueryView query={recurrences} label="the mean cumulative function" isEmpty={(d) => d.groups.every((g) => g.machines === 0)} emptyText="No machines match these filters.">
          {(d) => (
            <ChartCard
              title="Repeat repairs: mean cumulative function"
              subtitle={
                <label>Repairs of{" "}
                  <select aria-label="Component for repeat repairs" className="rounded border border-line bg-white px-1 text-sm" value={mcfComponent} onChange={(e) => set({ mcfComponent: e.target.value })}>
                    {components.filter((c) => c.code !== "SVC-PM").map((c) => <option key={c.code} value={c.code}>{c.name}</option>)}
                  </select>
                  {d.groups[0]?.slopePerThousandHours != null && <> · {fmt.quantity("rate", d.groups[0].slopePerThousandHours)} repairs per machine per {fmt.count(1000)} h</>}
                </label>
              }
              options={mcfChart(d, palette, fmt)}
              rows={d.groups.flatMap((g) => g.steps.map((s) => ({ group: g.label, ...s })))}
              columns={[{ key: "group", label: "Group" }, { key: "age", label: "Engine hours", csvLabel: "Engine hours (h)" }, { key: "mcf", label: "Mean repairs", csvLabel: "Mean repairs (per machine)" }, { key: "lower", label: "95 % lower", csvLabel: "95 % lower (per machine)" }, { key: "upper", label: "95 % upper", csvLabel: "95 % upper (per machine)" }, { key: "atRisk", label: "Machines" }]}
              filename="life-mcf.csv"
              footer={d.method}
            />
          )}
        </QueryView>
        <QueryView query={costs} label="the cost mean cumulative function" isEmpty={(d) => d.groups.every((g) => g.machines === 0)} emptyText="No machines match these filters.">
          {(d) => (
            <ChartCard
              title="Repair cost per machine (Nelson cost MCF)"
              subtitle={`Parts + labour of ${components.find((c) => c.code === mcfComponent)?.name.toLowerCase() ?? mcfComponent} repairs${d.groups[0]?.slopePerThousandHours != null ? ` · ${fmt.moneyWhole(d.groups[0].slopePerThousandHours)} per machine per 1,000 h` : ""}`}
              options={costMcfChart(d, palette, fmt)}
              rows={d.groups.flatMap((g) => g.steps.map((s) => ({ group: g.label, ...s })))}
              columns={[{ key: "group", label: "Group" }, { key: "age", label: "Engine hours", csvLabel: "Engine hours (h)" }, { key: "mcf", label: "Mean cost", csvLabel: `Mean cost (${fmt.currency} per machine)` }, { key: "lower", label: "95 % lower", csvLabel: `95 % lower (${fmt.currency} per machine)` }, { key: "upper", label: "95 % upper", csvLabel: `95 % upper (${fmt.currency} per machine)` }, { key: "atRisk", label: "Machines" }]}
              filename="life-cost-mcf.csv"
              footer={<>{d.method} Cost in {fmt.currency}.</>}
            />
          )}
        </QueryView>
      </div>
    </div>
  );
}
