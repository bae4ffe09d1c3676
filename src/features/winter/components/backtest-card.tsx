import type { WinterBacktest } from "@shared/schemas/winter";
import { Card } from "@/components/ui/states";
import { useFormat } from "@/lib/use-format";
import { ScrollTable, num, td, th } from "./scroll-table";

/** The last complete winter forecast from the data before it, beside what happened. */
export function BacktestCard({ backtest }: { backtest: WinterBacktest }) {
  const f = useFormat();
  const c = backtest.coverage;
  return (
    <Card title="How well this forecast did last winter">
      <p className="mb-3 text-sm">
        Winter {f.date(backtest.season.from)} – {f.date(backtest.season.to)}, forecast from data before {f.date(backtest.trainedBefore)}.{" "}
        <strong>
          {f.count(c.inside)} of {f.count(c.shops)} shops
        </strong>{" "}
        came inside their {f.percent(c.level)} interval ({f.percent(c.share)}); before the shop calibration, {f.count(c.modelInside)} of{" "}
        {f.count(c.shops)} did.
      </p>
      <ScrollTable label="Last winter: forecast and actual by shop">
        <thead>
          <tr>
            <th scope="col" className={th}>Shop</th>
            <th scope="col" className={`${th} text-right`}>Forecast</th>
            <th scope="col" className={`${th} text-right`}>Interval</th>
            <th scope="col" className={`${th} text-right`}>Actual</th>
            <th scope="col" className={th}>Inside the interval</th>
            <th scope="col" className={`${th} text-right`}>Before calibration</th>
          </tr>
        </thead>
        <tbody>
          {backtest.shops.map((r) => (
            <tr key={r.shopCode}>
              <td className={td}>{r.shopCode} <span className="text-muted">{r.shopName}</span></td>
              <td className={num}>{f.quantity("ratio", r.forecast)}</td>
              <td className={num}>{f.count(r.lower)}–{f.count(r.upper)}</td>
              <td className={num}>{f.count(r.actual)}</td>
              <td className={td}>{r.inside ? "yes" : <span className="font-semibold text-alert">no</span>}</td>
              <td className={num}>
                {f.quantity("ratio", r.modelForecast)} ({f.count(r.modelLower)}–{f.count(r.modelUpper)}
                {r.modelInside ? "" : ", outside"})
              </td>
            </tr>
          ))}
          <tr className="font-semibold">
            <td className={td}>All shops</td>
            <td className={num}>{f.quantity("ratio", backtest.total.forecast)}</td>
            <td className={num}>{f.count(backtest.total.lower)}–{f.count(backtest.total.upper)}</td>
            <td className={num}>{f.count(backtest.total.actual)}</td>
            <td className={td}>{backtest.total.inside ? "yes" : "no"}</td>
            <td className={num}>
              {f.quantity("ratio", backtest.total.modelForecast)} ({f.count(backtest.total.modelLower)}–{f.count(backtest.total.modelUpper)})
            </td>
          </tr>
        </tbody>
      </ScrollTable>
      <p className="mt-2 text-xs text-muted">{backtest.method}</p>
    </Card>
  );
}
