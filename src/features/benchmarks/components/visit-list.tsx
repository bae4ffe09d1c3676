import type { ShopBenchmarks } from "@shared/schemas/benchmarks";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";

const badge = { visit: "bg-alert text-white", watch: "bg-ochre text-ink" } as const;
const badgeText = { visit: "Visit", watch: "Watch" } as const;

/**
 * What a group-wide reader sees first: the shops that need a visit this period, the reasons in words, and
 * the way to the comeback pairs behind each figure.
 */
export function VisitList({ data, onOpen }: { data: ShopBenchmarks; onOpen: (shop: string, tech?: string) => void }) {
  const { visits, period, group } = data;
  const fm = useBenchmarkFormat();
  return (
    <section aria-label="Which shop needs a visit" className="rounded-lg border border-line bg-card p-4 shadow-sm">
      <h2 className="text-lg font-semibold">Which shop needs a visit — {period.label}</h2>
      <p className="text-sm text-muted">
        {group ? `Group comeback rate ${fm.pct(group.comeback.value)} over ${fm.count(group.lines)} lines.` : data.groupHidden} A shop is listed when its rate is outside the
        funnel for its volume, or its 95 % interval lies wholly above the group rate; busy and quiet shops are judged fairly.
      </p>
      {visits.length === 0 ? (
        <p className="mt-3 rounded border border-dashed border-line p-3">No shop stands out this period: every comeback rate is inside the funnel for its volume.</p>
      ) : (
        <ul className="mt-3 space-y-3">
          {visits.map((v) => {
            const shop = data.shops.find((s) => s.key === v.key);
            return (
              <li key={v.key} className="flex flex-wrap items-start gap-3 rounded border border-line p-3">
                <span className={`rounded px-2 py-0.5 text-xs font-bold uppercase tracking-wide ${badge[v.severity]}`}>{badgeText[v.severity]}</span>
                <div className="min-w-0 flex-1">
                  <p className="font-semibold">
                    {v.label}
                    {shop && <span className="ml-2 font-normal text-muted">comeback rate {fm.share(shop.comeback)}</span>}
                  </p>
                  <ul className="mt-1 list-disc space-y-0.5 pl-5 text-sm">
                    {v.reasons.map((r) => (
                      <li key={r}>{r}</li>
                    ))}
                  </ul>
                </div>
                {shop?.drillDown && shop.shopCode && (
                  <button type="button" onClick={() => onOpen(shop.shopCode!)} className="rounded bg-slate px-3 py-1.5 text-sm text-paper hover:bg-ink">
                    See the comeback pairs
                  </button>
                )}
              </li>
            );
          })}
        </ul>
      )}
    </section>
  );
}

/** What a shop manager sees first: their own shop against the group, in words. */
export function OwnShopSummary({ data, onOpen }: { data: ShopBenchmarks; onOpen: (shop: string, tech?: string) => void }) {
  const own = data.shops.filter((s) => !s.peer);
  const fm = useBenchmarkFormat();
  return (
    <section aria-label="Where your shop stands" className="rounded-lg border border-line bg-card p-4 shadow-sm">
      <h2 className="text-lg font-semibold">Where your shop stands — {data.period.label}</h2>
      {own.map((s) => (
        <div key={s.key} className="mt-2">
          <p>
            <span className="font-semibold">{s.label}</span>: comeback rate {fm.share(s.comeback)}
            {data.group ? ` against the group's ${fm.pct(data.group.comeback.value)}. ${s.comeback.words}.` : "."}
          </p>
          {s.technicians && s.technicians.some((t) => t.aboveGroup) && (
            <p className="mt-1 text-sm">
              Above the group rate:{" "}
              {s.technicians
                .filter((t) => t.aboveGroup)
                .map((t) => (
                  <button key={t.techId} type="button" onClick={() => onOpen(s.shopCode!, t.techId)} className="mr-2 underline decoration-dotted hover:text-accent">
                    {t.techId} {t.name} ({fm.pct(t.comeback.value)} of {fm.count(t.comeback.n)})
                  </button>
                ))}
            </p>
          )}
          <button type="button" onClick={() => onOpen(s.shopCode!)} className="mt-2 rounded bg-slate px-3 py-1.5 text-sm text-paper hover:bg-ink">
            See the comeback pairs
          </button>
        </div>
      ))}
      {data.groupHidden && <p className="mt-2 rounded border border-dashed border-line p-2 text-sm">{data.groupHidden}</p>}
      {data.peers && (
        <p className="mt-3">
          The other shops' comeback rates, in groups of 3 or more: {data.peers.comeback.words}.
        </p>
      )}
      {data.formulas.anonymity && (
        <div className="mt-3 text-xs text-muted">
          <p className="font-semibold text-ink">How other shops are shown</p>
          <p>{data.formulas.anonymity}</p>
        </div>
      )}
    </section>
  );
}
