import type { ReactNode } from "react";
import type { FunnelStatus, PeerSpread, PeerSummary, ShareFigure, ShopBenchmark, ShopBenchmarks } from "@shared/schemas/benchmarks";
import { downloadText, toCsv } from "@/lib/csv";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";
import { lineKpiLabels, type LineKpi } from "@shared/schemas/benchmark-details";

/** A figure that opens the lines behind it, for a shop whose lines the caller may see. */
const opener = (s: ShopBenchmark, kpi: LineKpi, onOpen: (shop: string, kpi?: LineKpi) => void) => (main: ReactNode) =>
  s.drillDown && s.shopCode ? (
    // the figure stays part of the button's name (what a speech user says is what they see), after what it opens
    <button type="button" onClick={() => onOpen(s.shopCode!, kpi)} className="relative text-left underline decoration-dotted hover:text-accent">
      <span className="sr-only">{`${lineKpiLabels[kpi]} of ${s.label}: see the lines, `}</span>
      {main}
    </button>
  ) : (
    main
  );

const statusText: Record<FunnelStatus, string> = {
  above_998: "above 99.8 %",
  above_95: "above 95 %",
  within: "within",
  below_95: "below 95 %",
  below_998: "below 99.8 %",
  not_rated: "not rated",
};
const statusClass: Record<FunnelStatus, string> = {
  above_998: "bg-alert text-white",
  above_95: "bg-ochre text-ink",
  within: "bg-accent-soft text-ink",
  below_95: "bg-ok/15 text-ink",
  below_998: "bg-ok/15 text-ink",
  not_rated: "bg-paper text-muted",
};

function Head({ title, formula }: { title: string; formula: string }) {
  return (
    <th scope="col" className="border-b border-line px-2 py-2 align-bottom font-semibold">
      <span className="block">{title}</span>
      <span className="block text-xs font-normal text-muted">{formula}</span>
    </th>
  );
}

function Cell({ main, sub }: { main: ReactNode; sub?: ReactNode }) {
  return (
    <td className="border-b border-line/60 px-2 py-1.5 align-top tabular-nums">
      <span className="block">{main}</span>
      {sub && <span className="block text-xs text-muted">{sub}</span>}
    </td>
  );
}

/** Claims on time; "no data yet" in short, the reason in the cell's second line. */
function ClaimsCell({ f, open }: { f: ShareFigure; open?: (main: ReactNode) => ReactNode }) {
  const fm = useBenchmarkFormat();
  if (f.value !== null) return <Cell main={open ? open(fm.value(f)) : fm.value(f)} sub={fm.interval(f)} />;
  const [head, ...rest] = (f.note ?? "–").split(": ");
  return <Cell main={head} sub={rest.join(": ") || undefined} />;
}

/** One KPI of the other shops: each group on its own line ("3 below 4 %"), or why there is none. */
function SpreadCell({ spread, second }: { spread: PeerSpread; second?: PeerSpread }) {
  const lines = (sp: PeerSpread) => (sp.groups.length < 2 ? [sp.words] : sp.words.split(" · "));
  return (
    <td className="border-b border-line/60 px-2 py-1.5 align-top text-xs">
      {lines(spread).map((l) => (
        <span key={l} className="block">{l}</span>
      ))}
      {second && (
        <span className="mt-1 block text-muted">
          p90: {lines(second).join(" · ")}
        </span>
      )}
    </td>
  );
}

/** The other shops as one row of spreads: never one shop's figure (server/analytics/peer-groups.ts). */
function PeerRow({ peers }: { peers: PeerSummary }) {
  return (
    <tr>
      <td className="border-b border-line/60 px-2 py-1.5 align-top">
        <span className="block font-semibold">Other shops ({peers.shops})</span>
        <span className="block text-xs text-muted">in groups of 3 or more</span>
        <span className="block text-xs text-muted">{peers.lines.words}</span>
      </td>
      <SpreadCell spread={peers.comeback} />
      <Cell main="—" />
      <SpreadCell spread={peers.efficiency} />
      <SpreadCell spread={peers.partsWaitMedian} second={peers.partsWaitP90} />
      <SpreadCell spread={peers.backOrder} />
      <SpreadCell spread={peers.coldStartMeasured} />
      <SpreadCell spread={peers.warrantyOnTime} />
    </tr>
  );
}

/** One row per shop (the group first) with every KPI and its formula in the column header; the full formulas below. */
export function KpiTable({ data, onOpen }: { data: ShopBenchmarks; onOpen: (shop: string, kpi?: LineKpi) => void }) {
  const { group, formulas } = data;
  const fm = useBenchmarkFormat();
  const csvColumns = [
    { key: "label", label: "Shop" },
    { key: "lines", label: "Qualifying lines" },
    { key: "volumeBand", label: "Volume band" },
    { key: "comeback", label: "Comeback rate (fraction)" },
    { key: "comebackLower", label: "Comeback rate 95 % lower (fraction)" },
    { key: "comebackUpper", label: "Comeback rate 95 % upper (fraction)" },
    { key: "funnel", label: "Funnel" },
    { key: "efficiency", label: "Labour efficiency (ratio, standard ÷ actual hours)" },
    { key: "waitMedian", label: "Parts wait median (days)" },
    { key: "waitP90", label: "Parts wait p90 (days)" },
    { key: "backOrder", label: "Back-order rate (fraction)" },
    { key: "coldStart", label: "Cold-start jobs measured (fraction)" },
    { key: "claims", label: "Claims on time (fraction)" },
  ];
  const csvRow = (s: ShopBenchmark) => ({
    label: s.label, lines: s.lines, volumeBand: s.volumeBand, comeback: s.comeback.value, comebackLower: s.comeback.lower, comebackUpper: s.comeback.upper,
    funnel: statusText[s.comeback.funnel], efficiency: s.efficiency.value, waitMedian: s.partsWait.median, waitP90: s.partsWait.p90,
    backOrder: s.backOrder.value, coldStart: s.coldStartMeasured.value, claims: s.warrantyOnTime.value ?? s.warrantyOnTime.note,
  });
  const { peers } = data;
  const peerCsvRow = (p: PeerSummary) => ({
    label: `Other shops (${p.shops}), in groups of 3 or more`, lines: p.lines.words, volumeBand: null, comeback: p.comeback.words, comebackLower: null, comebackUpper: null,
    funnel: null, efficiency: p.efficiency.words, waitMedian: p.partsWaitMedian.words, waitP90: p.partsWaitP90.words,
    backOrder: p.backOrder.words, coldStart: p.coldStartMeasured.words, claims: p.warrantyOnTime.words,
  });
  return (
    <section aria-label="Shop KPIs" className="rounded-lg border border-line bg-card p-4 shadow-sm">
      <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
        <div>
          <h2 className="text-base font-semibold">Shop KPIs — {data.period.label}</h2>
          <p className="text-sm text-muted">Each column shows its formula; proportions carry a 95 % Wilson interval and are not rated below 30 lines. Select a figure of your shops to see the lines behind it.</p>
        </div>
        <button
          type="button"
          onClick={() => downloadText(`benchmarks-${data.period.key}.csv`, toCsv(csvColumns, [...data.shops.map(csvRow), ...(peers ? [peerCsvRow(peers)] : [])]))}
          className="rounded border border-line px-2 py-1 text-sm hover:bg-paper"
        >
          CSV
        </button>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[960px] text-left text-sm">
          <thead>
            <tr>
              <Head title="Shop" formula="volume: qualifying repair lines" />
              <Head title="Comeback rate" formula="lines with ≥ 1 comeback ÷ qualifying lines" />
              <Head title="Funnel" formula="against the group rate at this volume" />
              <Head title="Labour efficiency" formula="Σ standard h ÷ Σ actual h" />
              <Head title="Parts wait" formula="order → receipt, median · p90" />
              <Head title="Back-order rate" formula="back-ordered ÷ part lines" />
              <Head title="Cold-start jobs measured" formula="with a reading ÷ cold-start jobs" />
              <Head title="Claims on time" formula="filed by deadline ÷ claims" />
            </tr>
          </thead>
          <tbody>
            {group ? (
              <tr className="bg-paper/60 font-medium">
                <Cell main="Group" sub={`${fm.count(group.lines)} lines`} />
                <Cell main={fm.value(group.comeback)} sub={fm.interval(group.comeback)} />
                <Cell main="—" />
                <Cell main={fm.pct(group.efficiency.value)} sub={group.efficiency.lines === null ? undefined : `${fm.count(group.efficiency.lines)} lines`} />
                <Cell main={`${fm.days(group.partsWait.median)} · ${fm.days(group.partsWait.p90)}`} />
                <Cell main={fm.value(group.backOrder)} sub={fm.interval(group.backOrder)} />
                <Cell main={fm.value(group.coldStartMeasured)} sub={fm.interval(group.coldStartMeasured)} />
                <ClaimsCell f={group.warrantyOnTime} />
              </tr>
            ) : (
              <tr className="bg-paper/60">
                <Cell main="Group" />
                <td colSpan={7} className="border-b border-line/60 px-2 py-1.5 align-top text-sm">{data.groupHidden}</td>
              </tr>
            )}
            {data.shops.map((s) => (
              <tr key={s.key} className={s.peer ? "" : "bg-accent-soft/30"}>
                <Cell main={<span className="font-semibold">{s.label}</span>} sub={s.lines === null ? s.volumeBand : `${fm.count(s.lines)} lines`} />
                <Cell
                  main={
                    s.drillDown && s.shopCode ? (
                      <button type="button" onClick={() => onOpen(s.shopCode!)} className="text-left underline decoration-dotted hover:text-accent" title="See the comeback pairs">
                        {fm.value(s.comeback)}
                      </button>
                    ) : (
                      fm.value(s.comeback)
                    )
                  }
                  sub={fm.interval(s.comeback)}
                />
                <Cell main={<span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${statusClass[s.comeback.funnel]}`}>{statusText[s.comeback.funnel]}</span>} />
                <Cell
                  main={opener(s, "efficiency", onOpen)(s.efficiency.value === null ? s.efficiency.note : fm.pct(s.efficiency.value))}
                  sub={s.efficiency.standardHours === null ? undefined : `${fm.count(s.efficiency.standardHours)} ÷ ${fm.hours(Math.round(s.efficiency.actualHours!))}`}
                />
                <Cell main={opener(s, "partsWait", onOpen)(s.partsWait.n === 0 ? s.partsWait.note : `${fm.days(s.partsWait.median)} · ${fm.days(s.partsWait.p90)}`)} sub={s.partsWait.n ? `${fm.count(s.partsWait.n)} part lines` : undefined} />
                <Cell main={opener(s, "backOrder", onOpen)(fm.value(s.backOrder))} sub={fm.interval(s.backOrder)} />
                <Cell main={opener(s, "coldStart", onOpen)(fm.value(s.coldStartMeasured))} sub={fm.interval(s.coldStartMeasured)} />
                <ClaimsCell f={s.warrantyOnTime} open={s.drillDown ? opener(s, "claims", onOpen) : undefined} />
              </tr>
            ))}
            {peers && <PeerRow peers={peers} />}
          </tbody>
        </table>
      </div>
      <details className="mt-3 text-sm">
        <summary className="cursor-pointer font-semibold">How each figure is computed</summary>
        <dl className="mt-2 grid gap-x-4 gap-y-1 text-muted md:grid-cols-[12rem_1fr]">
          <dt className="font-semibold text-ink">Comeback rate</dt>
          <dd>{formulas.comebackRate}</dd>
          <dt className="font-semibold text-ink">Labour efficiency</dt>
          <dd>{formulas.labourEfficiency}</dd>
          <dt className="font-semibold text-ink">Parts wait</dt>
          <dd>{formulas.partsWait}</dd>
          <dt className="font-semibold text-ink">Back-order rate</dt>
          <dd>{formulas.backOrderRate}</dd>
          <dt className="font-semibold text-ink">Cold-start jobs measured</dt>
          <dd>{formulas.coldStartMeasured}</dd>
          <dt className="font-semibold text-ink">Claims on time</dt>
          <dd>{formulas.warrantyOnTime}</dd>
          {formulas.anonymity && (
            <>
              <dt className="font-semibold text-ink">Other shops</dt>
              <dd>{formulas.anonymity}</dd>
            </>
          )}
        </dl>
      </details>
    </section>
  );
}
