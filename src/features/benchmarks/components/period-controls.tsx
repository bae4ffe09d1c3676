import { useState } from "react";
import { COMEBACK_DAYS, COMEBACK_HOURS, periodKindLabels, periodKindSchema, type Period } from "@shared/schemas/benchmarks";
import type { BenchmarkParams } from "../api/benchmark-queries";
import { windowProblem } from "../window-field";

/** Period kind, month and the comeback window; every change goes to the URL. */
export function PeriodControls(props: {
  params: BenchmarkParams;
  period: Period | undefined;
  onChange: (next: Record<string, string | number | undefined>) => void;
}) {
  const { params, period, onChange } = props;
  const field = "rounded border border-line bg-card px-2 py-1 text-sm";
  return (
    <form className="flex flex-wrap items-end gap-3 rounded-lg border border-line bg-card p-3 text-sm" onSubmit={(e) => e.preventDefault()} aria-label="Period and comeback window">
      <label className="flex flex-col gap-1">
        <span className="text-muted">Period</span>
        <select className={field} value={params.period} onChange={(e) => onChange({ period: e.target.value, at: undefined })}>
          {periodKindSchema.options.map((k) => (
            <option key={k} value={k}>
              {periodKindLabels[k]}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1">
        <span className="text-muted">Month</span>
        <input
          type="month"
          className={field}
          value={params.at ?? period?.to.slice(0, 7) ?? ""}
          min={period?.firstMonth}
          max={period?.lastMonth}
          onChange={(e) => onChange({ at: e.target.value || undefined })}
        />
      </label>
      <WindowField
        id="comeback-days"
        label="Comeback within (days)"
        unit="days"
        limits={COMEBACK_DAYS}
        value={params.days}
        onApply={(v) => onChange({ days: v === COMEBACK_DAYS.default ? undefined : v, at: undefined })}
      />
      <WindowField
        id="comeback-hours"
        label="and engine hours"
        unit="engine hours"
        limits={COMEBACK_HOURS}
        value={params.hours}
        onApply={(v) => onChange({ hours: v === COMEBACK_HOURS.default ? undefined : v })}
      />
      {period && (
        <p className="basis-full text-xs text-muted sm:basis-auto sm:self-center">
          {period.label}: lines closed {period.from} to {period.to < period.countedThrough ? period.to : period.countedThrough}
          {period.complete ? "" : ` (lines closed after ${period.countedThrough} still have an open comeback window and wait)`}. Data to {period.asOf}.
        </p>
      )}
    </form>
  );
}

/**
 * A whole-number setting typed freely: what is typed stays in the field, a valid value is applied at once, and
 * anything else is explained beside the field in words (the last valid value stays applied meanwhile).
 */
function WindowField(props: { id: string; label: string; unit: string; limits: { min: number; max: number }; value: number; onApply: (v: number) => void }) {
  const { id, label, unit, limits, value, onApply } = props;
  const [text, setText] = useState(String(value));
  const [shown, setShown] = useState(value);
  // the applied value changed elsewhere (a link, a reset): show it
  if (shown !== value) {
    setShown(value);
    if (windowProblem(text, limits, unit) !== null || Number(text) !== value) setText(String(value));
  }
  const problem = windowProblem(text, limits, unit);
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-muted">
        {label}
      </label>
      <input
        id={id}
        type="text"
        inputMode="numeric"
        autoComplete="off"
        className={`w-24 rounded border bg-card px-2 py-1 text-sm ${problem ? "border-alert" : "border-line"}`}
        value={text}
        aria-invalid={problem !== null}
        aria-describedby={problem ? `${id}-problem` : undefined}
        onChange={(e) => {
          setText(e.target.value);
          if (windowProblem(e.target.value, limits, unit) === null) {
            setShown(Number(e.target.value.trim()));
            onApply(Number(e.target.value.trim()));
          }
        }}
      />
      {problem && (
        <p id={`${id}-problem`} role="alert" className="max-w-[14rem] text-xs text-alert">
          {problem} Still using {value}.
        </p>
      )}
    </div>
  );
}
