import { useQuery } from "@tanstack/react-query";
import { ChartCard } from "@/components/chart-card";
import { QueryView } from "@/features/filters/components/query-view";
import { palette } from "@/lib/palette";
import { benchmarkQueries, type BenchmarkParams } from "../api/benchmark-queries";
import { waitBandsChart, waitTrendChart } from "../charts/wait-charts";
import type { BenchmarkFormat } from "../format";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";
import { WAIT_BANDS, type Waits } from "@shared/schemas/benchmark-details";

/** The sentence that says what the charts show, for readers who cannot see them. */
function summary(d: Waits, { pct, count }: BenchmarkFormat): string {
  const over7 = (k: string) => [...(d.group ? [d.group] : []), ...d.shops].find((s) => s.key === k)!.over.find((o) => o.days === 7)!.figure.value;
  const worst = [...d.shops].sort((a, b) => (over7(b.key) ?? 0) - (over7(a.key) ?? 0))[0];
  const lead = d.group ? `${d.period.label}: ${pct(over7("group"))} of the group's ${count(d.group.n)} part lines waited over 7 days` : `${d.period.label}: ${d.groupHidden}`;
  return worst ? `${lead}; the most at ${worst.label}, ${pct(over7(worst.key))}.` : `${lead}.`;
}

/** Where parts waits matter: the share of lines waiting over 3, 7 and 14 days by shop, and the months that stand out. */
export function WaitsSection({ params }: { params: BenchmarkParams }) {
  const q = useQuery(benchmarkQueries.waits(params));
  const fm = useBenchmarkFormat();
  const num = (v: unknown) => (typeof v === "number" ? fm.pct(v / 100) : "–");
  const daysCell = (v: unknown) => (typeof v === "number" ? fm.days(v) : "–");
  const countCell = (v: unknown) => (typeof v === "number" ? fm.count(v) : "–");
  return (
    <QueryView query={q} label="the parts waits" lines={6}>
      {(d) => (
        <div className="grid gap-4 xl:grid-cols-2">
          <ChartCard
            title="Parts waits by shop"
            subtitle={`${d.period.label} · share of part lines by days from order to receipt`}
            options={waitBandsChart(d, palette, fm.pct)}
            rows={[...(d.group ? [d.group] : []), ...d.shops].map((s) => ({
              label: s.label, n: s.n, ...Object.fromEntries(s.bands.map((b) => [b.key, b.share * 100])),
              over3: (s.over[0]!.figure.value ?? 0) * 100, over7: (s.over[1]!.figure.value ?? 0) * 100, over14: (s.over[2]!.figure.value ?? 0) * 100, median: s.median,
            }))}
            columns={[
              { key: "label", label: "Shop" },
              { key: "n", label: "Part lines", csvLabel: "Part lines (count)", format: countCell },
              ...WAIT_BANDS.map((b) => ({ key: b.key, label: `${b.label} (%)`, percent: true, format: num })),
              { key: "over3", label: "Over 3 days (%)", percent: true, format: num },
              { key: "over7", label: "Over 7 days (%)", percent: true, format: num },
              { key: "over14", label: "Over 14 days (%)", percent: true, format: num },
              { key: "median", label: "Median (days)", format: daysCell },
            ]}
            filename={`parts-waits-${d.period.key}.csv`}
            footer={
              <>
                <p>{summary(d, fm)}</p>
                <ul className="mt-1 space-y-0.5">
                  {d.shops.map((s) => (
                    <li key={s.key}>
                      {s.label}: over 3 / 7 / 14 days {s.over.map((o) => fm.pct(o.figure.value)).join(" / ")}
                      {s.over[1]!.figure.lower !== null && ` (over 7 days, 95 %: ${fm.pct(s.over[1]!.figure.lower)}–${fm.pct(s.over[1]!.figure.upper)})`}, {fm.count(s.n)} part lines.
                    </li>
                  ))}
                </ul>
              </>
            }
          />
          {d.groupHidden ? (
            <section aria-label="Parts waits by month of order" className="rounded-lg border border-line bg-card p-4 shadow-sm">
              <h2 className="text-base font-semibold">Parts waits by month of order</h2>
              <p className="mt-2 rounded border border-dashed border-line p-3 text-sm">{d.groupHidden}</p>
            </section>
          ) : (
            <ChartCard
              title="Parts waits by month of order"
              subtitle="The group's part lines waiting over 7 and over 14 days; shaded: months that stand out"
              options={waitTrendChart(d, palette, fm.pct)}
              rows={d.months.map((m) => ({ month: m.month, n: m.n, over7: m.over7 === null ? null : m.over7 * 100, over14: m.over14 === null ? null : m.over14 * 100, backOrdered: m.backOrdered === null ? null : m.backOrdered * 100, median: m.median, standout: m.standout ? "stands out" : "" }))}
              columns={[
                { key: "month", label: "Month ordered" },
                { key: "n", label: "Part lines", csvLabel: "Part lines (count)", format: countCell },
                { key: "over7", label: "Over 7 days (%)", percent: true, format: num },
                { key: "over14", label: "Over 14 days (%)", percent: true, format: num },
                { key: "backOrdered", label: "Back-ordered (%)", percent: true, format: num },
                { key: "median", label: "Median (days)", format: daysCell },
                { key: "standout", label: "Stands out" },
              ]}
              filename="parts-waits-by-month.csv"
              footer={
                <>
                  {d.stretches.length === 0 ? (
                    <p>No month stands out: long waits are spread evenly over the data.</p>
                  ) : (
                    <ul className="space-y-1" aria-label="Months that stand out">
                      {[...d.stretches].sort((a, b) => b.over14 / b.lines - a.over14 / a.lines).map((s) => (
                        <li key={s.from} className="text-ink">
                          <b>{s.label}</b>: {s.words}
                        </li>
                      ))}
                    </ul>
                  )}
                  <p className="mt-1">{d.method}</p>
                </>
              }
            />
          )}
        </div>
      )}
    </QueryView>
  );
}
