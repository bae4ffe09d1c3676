import { useState } from "react";
import { readPeriod, type PeriodErrors, type PeriodText } from "../period-input";
import type { ForecastParams } from "../api/winter-queries";

const inputClass = "mt-1 block w-40 rounded border border-line bg-white px-2 py-1 text-sm aria-[invalid=true]:border-alert";

/**
 * The forecast period and service level, typed freely: the forecast's own rules check them and each problem is said
 * in words beside its field. Empty fields keep the defaults (the winter ahead, 90 %).
 */
export function PeriodControls({ value, period, onApply }: { value: PeriodText; period: { from: string; to: string } | null; onApply: (p: ForecastParams, text: PeriodText) => void }) {
  const [text, setText] = useState<PeriodText>(value);
  const [errors, setErrors] = useState<PeriodErrors>({});
  const field = (key: keyof PeriodText, label: string, hint: string) => (
    <div>
      <label htmlFor={`winter-${key}`} className="text-sm font-semibold">{label}</label>
      <input
        id={`winter-${key}`}
        value={text[key]}
        onChange={(e) => setText({ ...text, [key]: e.target.value })}
        aria-invalid={!!errors[key]}
        aria-describedby={`winter-${key}-hint${errors[key] ? ` winter-${key}-error` : ""}`}
        autoComplete="off"
        className={inputClass}
      />
      <p id={`winter-${key}-hint`} className="mt-1 text-xs text-muted">{hint}</p>
      {errors[key] && <p id={`winter-${key}-error`} role="alert" className="mt-1 text-xs text-alert">{errors[key]}</p>}
    </div>
  );
  return (
    <form
      noValidate
      aria-label="Forecast period and service level"
      className="flex flex-wrap items-start gap-4 rounded-lg border border-line bg-card p-4"
      onSubmit={(e) => {
        e.preventDefault();
        const r = readPeriod(text);
        setErrors(r.errors ?? {});
        if (r.params) onApply(r.params, text);
      }}
    >
      {field("from", "Period from", period ? `Empty: the winter ahead, from ${period.from}` : "Empty: the winter ahead")}
      {field("to", "Period to", period ? `Empty: to ${period.to}` : "Empty: 31 March after the start")}
      {field("serviceLevel", "Service level", "Chance the stock covers demand over the lead time, e.g. 90 %")}
      <button type="submit" className="mt-6 rounded bg-slate px-3 py-1.5 text-sm text-paper">Show forecast</button>
    </form>
  );
}
