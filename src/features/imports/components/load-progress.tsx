import type { ImportProgress } from "@shared/schemas/imports";
import { percentOf, phaseLabels, timeLeftInWords } from "../import-words";
import { useFormat } from "@/lib/use-format";

/** A load under way (or waiting for its turn): the bar, the figures beside it, and the way to stop it. */
export function LoadProgress(props: { fileName: string; queued: boolean; progress: ImportProgress | null; cancelling: boolean; onCancel: () => void }) {
  const fmt = useFormat();
  const p = props.progress;
  const pct = p ? percentOf(p) : 0;
  return (
    <div className="space-y-2">
      {props.queued || !p ? (
        <p role="status" className="text-sm">Waiting for the loader: loads run one at a time, in the order they were asked for.</p>
      ) : (
        <>
          <div className="flex flex-wrap items-baseline justify-between gap-x-4 text-sm">
            <span>{phaseLabels[p.phase]}</span>
            <span className="text-lg font-semibold tabular-nums">{pct} %</span>
          </div>
          <div
            role="progressbar"
            aria-label={`Loading ${props.fileName}`}
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={pct}
            aria-valuetext={`${pct} %, ${timeLeftInWords(p.secondsLeft)}`}
            className="h-3 overflow-hidden rounded-full border border-line bg-paper"
          >
            <div className="h-full bg-accent transition-[width] duration-700" style={{ width: `${pct}%` }} />
          </div>
          <p className="flex flex-wrap gap-x-4 text-sm text-muted tabular-nums">
            <span>{fmt.count(p.rowsRead)} rows read</span>
            <span>{fmt.count(Math.round(p.rowsPerSecond))} rows/s</span>
            <span>{timeLeftInWords(p.secondsLeft)}</span>
          </p>
        </>
      )}
      <button type="button" onClick={props.onCancel} disabled={props.cancelling} className="rounded border border-alert px-3 py-1.5 text-sm font-semibold text-alert disabled:opacity-50">
        {props.cancelling ? "Cancelling…" : "Cancel"}
        <span className="sr-only"> loading {props.fileName}</span>
      </button>
      <p className="text-xs text-muted">A cancelled load keeps nothing of the file.</p>
    </div>
  );
}
