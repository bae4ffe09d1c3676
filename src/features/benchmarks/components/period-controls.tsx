import { COMEBACK_DAYS, COMEBACK_HOURS, periodKindLabels, periodKindSchema, type Period } from "@shared/schemas/benchmarks";
import type { BenchmarkParams } from "../api/benchmark-queries";

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
      <label className="flex flex-col gap-1">
        <span className="text-muted">Comeback within (days)</span>
        <input
          type="number"
          className={`${field} w-24`}
          min={COMEBACK_DAYS.min}
          max={COMEBACK_DAYS.max}
          value={params.days}
          onChange={(e) => {
            const v = Number(e.target.value);
            if (v >= COMEBACK_DAYS.min && v <= COMEBACK_DAYS.max) onChange({ days: v === COMEBACK_DAYS.default ? undefined : v, at: undefined });
          }}
        />
      </label>
      <label className="flex flex-col gap-1">
        <span className="text-muted">and engine hours</span>
        <input
          type="number"
          className={`${field} w-24`}
          min={COMEBACK_HOURS.min}
          max={COMEBACK_HOURS.max}
          step={10}
          value={params.hours}
          onChange={(e) => {
            const v = Number(e.target.value);
            if (v >= COMEBACK_HOURS.min && v <= COMEBACK_HOURS.max) onChange({ hours: v === COMEBACK_HOURS.default ? undefined : v });
          }}
        />
      </label>
      {period && (
        <p className="basis-full text-xs text-muted sm:basis-auto sm:self-center">
          {period.label}: lines closed {period.from} to {period.to < period.countedThrough ? period.to : period.countedThrough}
          {period.complete ? "" : ` (lines closed after ${period.countedThrough} still have an open comeback window and wait)`}. Data to {period.asOf}.
        </p>
      )}
    </form>
  );
}
