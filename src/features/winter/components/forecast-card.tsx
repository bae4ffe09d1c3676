import type { WinterForecast } from "@shared/schemas/winter";
import { Card } from "@/components/ui/states";
import { useFormat } from "@/lib/use-format";
import { ScrollTable, num, td, th } from "./scroll-table";
import { StockForm } from "./stock-form";

/** Per shop and part: the expected failures with their interval, and the stock advice with editable stock on hand. */
export function ForecastCard({ forecast }: { forecast: WinterForecast }) {
  const f = useFormat();
  const dec = (n: number) => f.quantity("ratio", n);
  return (
    <div className="space-y-4">
      <Card title={`Expected cold-start part failures, ${f.date(forecast.period.from)} – ${f.date(forecast.period.to)}`}>
        <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
          <ScrollTable label="Forecast by shop and part">
            <thead>
              <tr>
                <th scope="col" className={th}>Shop</th>
                <th scope="col" className={th}>Part</th>
                <th scope="col" className={`${th} text-right`}>Machines</th>
                <th scope="col" className={`${th} text-right`}>Expected failures</th>
                <th scope="col" className={`${th} text-right`}>90 % interval</th>
                <th scope="col" className={`${th} text-right`}>Shop calibration</th>
              </tr>
            </thead>
            <tbody>
              {forecast.rows.map((r) => (
                <tr key={`${r.shopCode}-${r.partNumber}`}>
                  <td className={td}>{r.shopCode} <span className="text-muted">{r.shopName}</span></td>
                  <td className={td}>{r.componentName} <span className="font-mono text-xs text-muted">{r.partNumber}</span></td>
                  <td className={num}>{f.count(r.machines)}</td>
                  <td className={num}>{dec(r.expected)}</td>
                  <td className={num}>{f.count(r.lower)}–{f.count(r.upper)}</td>
                  <td className={num} title={`before calibration: ${dec(r.modelExpected)}`}>× {dec(r.calibration)}</td>
                </tr>
              ))}
            </tbody>
          </ScrollTable>
          <div className="space-y-2 text-sm">
            <h3 className="font-semibold">How this is worked out</h3>
            <p>{forecast.method}</p>
            <p className="text-muted">{forecast.intervalNote}</p>
          </div>
        </div>
      </Card>
      <Card title={`Stock advice at a ${f.percent(forecast.serviceLevel)} service level`}>
        <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
          <ScrollTable label="Stock advice by shop and part">
            <thead>
              <tr>
                <th scope="col" className={th}>Shop and part</th>
                <th scope="col" className={th}>Stock on hand</th>
                <th scope="col" className={`${th} text-right`}>Hold</th>
                <th scope="col" className={`${th} text-right`}>Gap</th>
                <th scope="col" className={th}>Order by</th>
                <th scope="col" className={`${th} text-right`}>Lead time (days)</th>
              </tr>
            </thead>
            <tbody>
              {forecast.rows.map((r) => (
                <tr key={`${r.shopCode}-${r.partNumber}`} data-testid={`stock-${r.shopCode}-${r.partNumber}`}>
                  <td className={td}>{r.shopCode} <span className="block font-mono text-xs">{r.partNumber}</span></td>
                  <td className={td}><StockForm shopCode={r.shopCode} partNumber={r.partNumber} onHand={r.onHand} /></td>
                  <td className={num}>{f.count(r.hold)}</td>
                  <td className={num} data-testid="gap">
                    {f.count(r.gap)}
                    {r.onHand === null && <span className="block text-xs font-normal text-muted">no stock entered</span>}
                  </td>
                  <td className={`${td} whitespace-nowrap`}>
                    {f.date(r.orderBy)}
                    {r.orderNow && r.gap > 0 && <span className="ml-1 rounded bg-alert px-1.5 py-0.5 text-xs font-semibold text-white">order now</span>}
                  </td>
                  <td className={num}>{f.count(r.leadTimeDays)}</td>
                </tr>
              ))}
            </tbody>
          </ScrollTable>
          <div className="space-y-2 text-sm">
            <h3 className="font-semibold">How much to hold</h3>
            <p>{forecast.stockMethod}</p>
            <LeadTimes forecast={forecast} />
          </div>
        </div>
      </Card>
    </div>
  );
}

function LeadTimes({ forecast }: { forecast: WinterForecast }) {
  const f = useFormat();
  if (forecast.leadTimes.length === 0) return null;
  return (
    <div>
      <h3 className="font-semibold">Planning lead time, measured from past winters</h3>
      <ul className="mt-1 space-y-1">
        {forecast.leadTimes.map((l) => (
          <li key={l.partNumber}>
            <span className="font-mono text-xs">{l.partNumber}</span>: {f.count(l.planningDays)} days
            <span className="text-muted">
              {" "}
              ({f.count(l.backOrderedLines)} back-ordered lines{l.medianDays !== null ? `, median ${f.count(l.medianDays)} days` : ""}). {l.basis}
            </span>
          </li>
        ))}
      </ul>
    </div>
  );
}
