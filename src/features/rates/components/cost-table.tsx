import type { CostRates } from "@shared/schemas/analytics-rates";
import { downloadText, toCsv } from "@/lib/csv";
import { useFormat } from "@/lib/use-format";

/** Repair cost per 1,000 engine hours, components down, shops across, with each shop's and component's total. */
export function CostTable({ d }: { d: CostRates }) {
  const f = useFormat();
  const money = f.moneyWhole;
  const cell = new Map(d.rows.map((r) => [`${r.component}|${r.shop}`, r]));
  const columns = [
    { key: "shop", label: "Shop" },
    { key: "name", label: "Component" },
    { key: "lines", label: "Failure lines" },
    { key: "partsCost", label: "Parts" },
    { key: "labourCost", label: "Labour" },
    { key: "cost", label: "Cost" },
    { key: "engineHours", label: "Shop engine hours" },
    { key: "perThousandHours", label: "Cost per 1,000 h" },
  ];
  return (
    <div className="space-y-2" data-testid="cost-table">
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Repair cost per 1,000 engine hours by component and shop</caption>
          <thead className="text-muted">
            <tr className="border-b border-line">
              <th className="py-1.5 pr-3">Component</th>
              {d.shops.map((s) => <th key={s.shop} className="pr-3 text-right">{s.shop}</th>)}
              <th className="text-right">All shops</th>
            </tr>
          </thead>
          <tbody>
            {d.components.map((c) => (
              <tr key={c.component} className="border-b border-line/60">
                <td className="py-1.5 pr-3">{c.name}</td>
                {d.shops.map((s) => <td key={s.shop} className="pr-3 text-right tabular-nums">{money(cell.get(`${c.component}|${s.shop}`)?.perThousandHours ?? (s.engineHours > 0 ? 0 : null))}</td>)}
                <td className="text-right font-semibold tabular-nums">{money(c.perThousandHours)}</td>
              </tr>
            ))}
            <tr className="font-semibold">
              <td className="py-1.5 pr-3">All components</td>
              {d.shops.map((s) => <td key={s.shop} className="pr-3 text-right tabular-nums">{money(s.perThousandHours)}</td>)}
              <td className="text-right tabular-nums">{money(d.perThousandHours)}</td>
            </tr>
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-xs text-muted">
        <p>{d.method} Cost in {f.currency}.</p>
        <button type="button" className="rounded border border-line px-2 py-1 text-sm text-ink hover:bg-paper" onClick={() => downloadText("rates-costs.csv", toCsv(columns, d.rows.map((r) => Object.fromEntries(columns.map((c) => [c.key, r[c.key as keyof typeof r]])))))}>
          CSV
        </button>
      </div>
    </div>
  );
}
