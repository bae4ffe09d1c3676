import type { RateComparisonAnswer } from "@shared/schemas/analytics-rates";
import { useFormat } from "@/lib/use-format";


/** A two-group rate comparison: the sentence first, then the numbers behind it. */
export function RateComparisonView({ d }: { d: RateComparisonAnswer }) {
  const fmt = useFormat();
  const hours = (v: number) => fmt.quantity("hours", v);
  const per = (v: number) => fmt.quantity("rate", v);
  return (
    <div className="space-y-2" data-testid="rate-comparison">
      <p className="text-base font-semibold">{d.sentence}</p>
      <table className="w-full text-left text-sm">
        <thead className="text-muted">
          <tr className="border-b border-line">
            <th className="py-1.5 pr-3">Group</th>
            <th className="pr-3 text-right">Failures</th>
            <th className="pr-3 text-right">Engine hours</th>
            <th className="text-right">Per 1,000 h (95 %)</th>
          </tr>
        </thead>
        <tbody>
          {[d.a, d.b].map((g) => (
            <tr key={g.label} className="border-b border-line/60">
              <td className="py-1.5 pr-3 font-semibold">{g.label}</td>
              <td className="pr-3 text-right tabular-nums">{fmt.count(g.failures)}</td>
              <td className="pr-3 text-right tabular-nums">{hours(g.engineHours)}</td>
              <td className="text-right tabular-nums">{g.perThousandHours ? `${per(g.perThousandHours.rate)} (${per(g.perThousandHours.lower)}–${per(g.perThousandHours.upper)})` : "—"}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {d.comparison && (
        <p className="text-sm tabular-nums">
          Rate ratio {d.comparison.ratio === null ? "unbounded" : fmt.quantity("ratio", d.comparison.ratio)}, 95 % interval {fmt.quantity("ratio", d.comparison.lower)}–{d.comparison.upper === null ? "unbounded" : fmt.quantity("ratio", d.comparison.upper)}, two-sided p {fmt.pValue(d.comparison.pValue)}; {fmt.quantity("plain", d.comparison.expectedA)} failures expected in {d.a.label} if the rates were equal.
        </p>
      )}
      <p className="text-xs text-muted">{d.method}</p>
    </div>
  );
}
