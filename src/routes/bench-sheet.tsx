import { useQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import { meQueries } from "@/features/session/api/me-queries";
import { useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { usePressureUnit } from "@/features/filters/hooks/use-pressure-unit";
import { benchSheetQueries } from "@/features/bench-sheet/api/bench-sheet-queries";
import { LineFinder, NewLineForm } from "@/features/bench-sheet/components/line-finder";
import { SheetForm } from "@/features/bench-sheet/components/sheet-form";
import { SheetSummary } from "@/features/bench-sheet/components/sheet-summary";
import { useBenchDraft, type SyncState } from "@/features/bench-sheet/hooks/use-bench-draft";
import { useOnline } from "@/features/bench-sheet/hooks/use-online";
import { QueryView } from "@/features/filters/components/query-view";
import { ErrorNotice } from "@/components/ui/states";
import { useFormat } from "@/lib/use-format";
import type { PrimeCache } from "@/app/page-loader";
import type { BenchLineDetail } from "@shared/schemas/bench-sheet";
import type { Me } from "@shared/schemas/me";

const HOW_DRAFTS_WORK =
  "Everything you type is kept on this device as you type it, for you and this line only. Save sends the sheet to Ironledger. With no connection, Save keeps the sheet waiting here and sends it by itself, once, when the connection returns; the page then says “Sent”. Clearing this browser's data for Ironledger removes a draft that has not been sent.";

function Status({ sync, online, kept, onSend }: { sync: SyncState; online: boolean; kept: boolean; onSend: () => void }) {
  const fmt = useFormat();
  let text: React.ReactNode = kept ? "Draft kept on this device." : "This browser will not keep the draft (private mode or full storage): save before you leave the page.";
  if (sync.kind === "sending") text = "Sending…";
  else if (sync.kind === "sent") text = <b className="text-ok">Sent. {fmt.count(sync.stored)} {sync.stored === 1 ? "reading" : "readings"} stored or changed.</b>;
  else if (sync.kind === "waiting") text = <b>{sync.message}</b>;
  else if (sync.kind === "invalid") text = <b className="text-alert">Not sent: {sync.problems.map((p) => p.message).join("; ")}.</b>;
  else if (sync.kind === "refused") text = <b className="text-alert">Not saved: {sync.message} Each refused value is marked beside its field; nothing of the sheet was stored.</b>;
  return (
    <div className="space-y-1 text-sm" role="status" aria-live="polite">
      {!online && <p className="font-bold text-alert">No connection. Keep going: the sheet stays on this device.</p>}
      <p>{text}</p>
      {sync.kind === "waiting" && online && (
        <button type="button" onClick={onSend} className="min-h-11 rounded-lg border-2 border-slate px-3 font-semibold">Send now</button>
      )}
    </div>
  );
}

function Sheet({ me, detail }: { me: Me; detail: BenchLineDetail }) {
  const [temperatureUnit] = useTemperatureUnit();
  const [pressureUnit] = usePressureUnit();
  const online = useOnline();
  const fmt = useFormat();
  const l = detail.line;
  const { draft, edit, send, sync, kept } = useBenchDraft(me.sub, l, { temperatureUnit, pressureUnit });
  const refusals = sync.kind === "refused" ? sync.refused : [];
  const saved = detail.readings.filter((r) => r.source === "sheet").length;
  return (
    <div className="space-y-4 pb-4">
      <header className="rounded-xl border border-line bg-card p-4">
        <p className="text-sm text-muted">{l.shopCode} · opened {fmt.date(l.openedDate)}{l.closedDate ? ` · closed ${fmt.date(l.closedDate)}` : ""}</p>
        <h2 className="text-xl font-bold">RO {l.roNumber}, line {l.lineNo} · {l.serial}</h2>
        <p className="text-sm">{[l.modelLine, l.engineFamily, l.cylinders ? `${l.cylinders} cylinders` : "cylinders not known: four offered"].filter(Boolean).join(" · ")}</p>
        {l.complaint && <p className="mt-1 text-sm">Complaint: {l.complaint}</p>}
        {saved > 0 && <p className="mt-1 text-sm font-semibold">{fmt.count(saved)} readings saved from a sheet on this line{detail.hourMeter ? `; hour meter ${fmt.quantity("hours", detail.hourMeter.hours)} h on ${fmt.date(detail.hourMeter.readingDate)}` : ""}.</p>}
      </header>
      <SheetForm draft={draft} edit={edit} refusals={refusals} temperatureUnit={temperatureUnit} parts={detail.plugParts} spec={detail.familySpec} />
      <SheetSummary draft={draft} parts={detail.plugParts} spec={detail.familySpec} temperatureUnit={temperatureUnit} />
      {sync.kind === "failed" && <ErrorNotice error={sync.error} />}
      {refusals.some((r) => r.field === "sheet") && (
        <ul className="text-sm font-semibold text-alert">{refusals.filter((r) => r.field === "sheet").map((r, i) => <li key={i}>{r.label}: {r.reason}</li>)}</ul>
      )}
      <div className="sticky bottom-0 z-10 -mx-4 border-t-2 border-slate bg-paper px-4 py-3 shadow-[0_-4px_12px_rgba(0,0,0,0.08)]">
        <div className="flex flex-wrap items-center gap-3">
          <div className="min-w-0 flex-1"><Status sync={sync} online={online} kept={kept} onSend={() => void send()} /></div>
          <button type="button" onClick={() => void send()} disabled={sync.kind === "sending"} className="min-h-12 w-full rounded-lg bg-accent px-6 text-lg font-bold text-white sm:w-auto">
            Save the sheet
          </button>
        </div>
      </div>
    </div>
  );
}

export const primeCache: PrimeCache = (qc, { url }) => {
  const id = url.searchParams.get("line");
  if (id) void qc.prefetchQuery(benchSheetQueries.line(id));
};

export function Component() {
  const [params, setParams] = useSearchParams();
  const lineId = params.get("line") ?? "";
  const me = useQuery(meQueries.current()).data;
  const line = useQuery(benchSheetQueries.line(lineId));
  const shops = me?.scope.kind === "shops" ? me.scope.shops : [];
  const pick = (id: string) => setParams(id ? { line: id } : {});
  if (!me) return null;
  return (
    <div className="mx-auto max-w-3xl space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h1 className="text-2xl font-bold">Bench sheet</h1>
        {lineId && <button type="button" onClick={() => pick("")} className="min-h-11 rounded-lg border-2 border-line bg-card px-3 font-semibold">Another line</button>}
      </div>
      <p className="text-sm">Cold-start readings at the machine, interpreted as you type them. {HOW_DRAFTS_WORK}</p>
      {lineId && line.data ? (
        // kept on screen while a background refetch fails (no connection): the draft lives in the sheet
        <Sheet key={`${me.sub}|${line.data.line.id}`} me={me} detail={line.data} />
      ) : lineId ? (
        <QueryView query={line} label="the repair-order line" lines={8}>
          {(d) => <Sheet key={`${me.sub}|${d.line.id}`} me={me} detail={d} />}
        </QueryView>
      ) : (
        <>
          <LineFinder onPick={(l) => pick(l.id)} />
          <details className="rounded-xl border border-line bg-card p-4">
            <summary className="min-h-11 cursor-pointer py-2 text-lg font-bold">Start a new line (not exported by the shop yet)</summary>
            <NewLineForm shops={shops} onCreated={(l) => pick(l.id)} />
          </details>
        </>
      )}
    </div>
  );
}
