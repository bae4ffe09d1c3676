import type { ReactNode } from "react";

/** Touch pieces of the bench sheet: every target at least 44 px high (WCAG 2.1 SC 2.5.5), readable in a cold, bright shop. */

const tone: Record<string, string> = {
  good: "border-ok bg-ok text-white", healthy: "border-ok bg-ok text-white",
  watch: "border-ochre bg-ochre text-ink", high: "border-ochre bg-ochre text-ink", suspect: "border-ochre bg-ochre text-ink",
  fault: "border-alert bg-alert text-white", open: "border-alert bg-alert text-white", short: "border-alert bg-alert text-white",
};

/** An interpretation beside a value: its verdict in a tag, then its words and where the band comes from. */
export function Reading({ id, verdict, children, source }: { id?: string; verdict: string | null; children: ReactNode; source?: string | null }) {
  return (
    <p id={id} className="mt-1 text-sm">
      {verdict && <span className={`mr-1.5 inline-block rounded border px-1.5 font-semibold ${tone[verdict] ?? "border-line"}`}>{verdict}</span>}
      {children}
      {source && <span className="text-muted"> ({source})</span>}
    </p>
  );
}

/** One choice of several as large buttons (a radio group under the hood, so it reads as one to a screen reader). */
export function Segmented<T extends string>({ legend, name, value, options, onChange, hideLegend, describedBy }: {
  legend: string;
  name: string;
  value: T | null;
  options: readonly { value: T; label: string }[];
  onChange: (v: T) => void;
  hideLegend?: boolean;
  describedBy?: string;
}) {
  return (
    <fieldset aria-describedby={describedBy}>
      <legend className={hideLegend ? "sr-only" : "mb-1 text-sm font-semibold"}>{legend}</legend>
      <div className="flex flex-wrap gap-1.5">
        {options.map((o) => (
          <label
            key={o.value}
            className={`flex min-h-11 min-w-11 cursor-pointer items-center justify-center rounded-lg border-2 px-3 text-base font-semibold has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-accent ${value === o.value ? "border-slate bg-slate text-paper" : "border-line bg-card text-ink"}`}
          >
            <input type="radio" className="sr-only" name={name} value={o.value} checked={value === o.value} onChange={() => onChange(o.value)} />
            {o.label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}

/** A number typed on the phone's decimal keypad. */
export function DecimalInput({ id, label, value, onChange, unit, describedBy, invalid, disabled, hideLabel }: {
  id: string;
  label: string;
  value: string;
  onChange: (v: string) => void;
  unit?: string;
  describedBy?: string;
  invalid?: boolean;
  disabled?: boolean;
  hideLabel?: boolean;
}) {
  return (
    <div>
      <label htmlFor={id} className={hideLabel ? "sr-only" : "mb-1 block text-sm font-semibold"}>
        {label}
      </label>
      <div className="flex items-center gap-2">
        <input
          id={id}
          type="text"
          inputMode="decimal"
          autoComplete="off"
          enterKeyHint="next"
          value={value}
          disabled={disabled}
          onChange={(e) => onChange(e.target.value)}
          aria-describedby={describedBy}
          aria-invalid={invalid || undefined}
          className={`min-h-11 w-full min-w-0 rounded-lg border-2 bg-card px-3 text-lg tabular-nums disabled:bg-paper disabled:text-muted ${invalid ? "border-alert" : "border-slate/60"}`}
        />
        {unit && <span className="shrink-0 text-base font-semibold" aria-hidden="true">{unit}</span>}
      </div>
    </div>
  );
}

/** The cautions of the work done at this field, kept beside it (open by default: they are read before the work). */
export function Cautions({ id, items, title = "Before you do this" }: { id?: string; items: readonly string[]; title?: string }) {
  return (
    <details open className="mt-3 rounded-lg border-2 border-ochre bg-ochre/10 p-3 text-sm" id={id}>
      <summary className="min-h-11 cursor-pointer py-2 font-semibold">{title}</summary>
      <ul className="list-disc space-y-1 pl-4">
        {items.map((c) => <li key={c}>{c}</li>)}
      </ul>
    </details>
  );
}

/** Refusals of the server beside the field they name. */
export function Refusals({ id, items }: { id?: string; items: readonly { reason: string; value: string }[] }) {
  if (!items.length) return null;
  return (
    <ul id={id} className="mt-1 space-y-0.5 text-sm font-semibold text-alert">
      {items.map((r, i) => <li key={i}>Not saved: {r.reason}{r.value ? ` (sent: ${r.value})` : ""}</li>)}
    </ul>
  );
}

export function Section({ id, title, children, aside }: { id: string; title: string; children: ReactNode; aside?: ReactNode }) {
  return (
    <section aria-labelledby={id} className="rounded-xl border border-line bg-card p-4">
      <div className="mb-3 flex flex-wrap items-center justify-between gap-2">
        <h2 id={id} className="text-lg font-bold">{title}</h2>
        {aside}
      </div>
      {children}
    </section>
  );
}
