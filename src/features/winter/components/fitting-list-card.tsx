import { useState } from "react";
import type { FittingList } from "@shared/schemas/fitting-list";
import { Card, EmptyState } from "@/components/ui/states";
import { useFormat } from "@/lib/use-format";
import { fittingPaths } from "../api/fitting-queries";
import { ScrollTable, num, td, th } from "./scroll-table";

const FIRST = 50;

/** Machines at cold shops without a block heater, in fitting order, with the downloads and the cautions beside them. */
export function FittingListCard({ list }: { list: FittingList }) {
  const f = useFormat();
  const [all, setAll] = useState(false);
  const rows = all ? list.rows : list.rows.slice(0, FIRST);
  const links = (
    <div className="flex flex-wrap gap-2">
      <a href={fittingPaths.csv()} download className="rounded border border-line bg-white px-3 py-1 text-sm hover:border-accent">Download CSV</a>
      <a href={fittingPaths.pdf()} download className="rounded border border-line bg-white px-3 py-1 text-sm hover:border-accent">Printable PDF</a>
    </div>
  );
  return (
    <Card title="Block heaters to fit" actions={links}>
      <div className="space-y-3">
        <div className="min-w-0 space-y-3">
          <p className="text-sm">
            {list.coldShops.length > 0
              ? `${f.count(list.rows.length)} ${list.rows.length === 1 ? "machine" : "machines"} in service at ${list.coldShops.map((s) => `${s.code} ${s.name}`).join(", ")} ${list.rows.length === 1 ? "has" : "have"} no block heater (data to ${f.date(list.asOf)}).`
              : "None of your shops is a cold shop, so no machine is listed."}
          </p>
          <div className="space-y-1 text-sm text-muted">
            <p><span className="font-semibold text-ink">Which shops: </span>{list.coldRule}</p>
            <p><span className="font-semibold text-ink">In what order: </span>{list.orderRule}</p>
            {list.otherShops.length > 0 && <p>Not cold: {list.otherShops.join(", ")}.</p>}
          </div>
          <Cautions cautions={list.cautions} />
          {list.rows.length === 0 ? (
            <EmptyState title="No machines to fit">Every machine in service at a cold shop in your view has a block heater, or none of your shops is cold.</EmptyState>
          ) : (
            <>
              <ScrollTable label="Block-heater fitting list">
                <thead>
                  <tr>
                    <th scope="col" className={th}>Shop</th>
                    <th scope="col" className={th}>Serial</th>
                    <th scope="col" className={th}>Model</th>
                    <th scope="col" className={th}>Engine family</th>
                    <th scope="col" className={th}>Delivered</th>
                    <th scope="col" className={`${th} text-right`}>Age (months)</th>
                    <th scope="col" className={`${th} text-right`}>Hour meter (h)</th>
                    <th scope="col" className={`${th} text-right`}>Heater-plug age (h)</th>
                    <th scope="col" className={th}>Why listed</th>
                  </tr>
                </thead>
                <tbody>
                  {rows.map((r) => (
                    <tr key={r.serial}>
                      <td className={td}>{r.shopCode}</td>
                      <td className={`${td} font-mono text-xs`}>{r.serial}</td>
                      <td className={td}>{r.modelLine}</td>
                      <td className={`${td} whitespace-nowrap`}>{r.engineFamily}</td>
                      <td className={`${td} whitespace-nowrap`}>{f.date(r.deliveryDate)}</td>
                      <td className={num}>{f.count(r.ageMonths)}</td>
                      <td className={num}>{f.count(r.hourMeter)}</td>
                      <td className={num} title={`${r.coldStartPartName}, fitted ${f.date(r.coldStartPartFitted)}`}>{f.count(r.coldStartPartHours)}</td>
                      <td className={`${td} min-w-64`}>{r.why}</td>
                    </tr>
                  ))}
                </tbody>
              </ScrollTable>
              {list.rows.length > FIRST && (
                <button type="button" onClick={() => setAll(!all)} className="rounded border border-line bg-white px-3 py-1 text-sm hover:border-accent">
                  {all ? `Show the first ${FIRST}` : `Show all ${f.count(list.rows.length)} machines`}
                </button>
              )}
            </>
          )}
        </div>
      </div>
    </Card>
  );
}

function Cautions({ cautions }: { cautions: readonly string[] }) {
  return (
    <aside aria-labelledby="block-heater-cautions" className="rounded border border-ochre/60 bg-paper p-3 text-sm">
      <h3 id="block-heater-cautions" className="font-semibold">Before fitting or plugging in a block heater</h3>
      <ul className="mt-2 list-disc space-y-1 pl-5">
        {cautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </aside>
  );
}
