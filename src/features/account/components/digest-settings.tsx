import { useId } from "react";
import { WEEKDAYS, weekdayName, type DigestPage } from "@shared/schemas/digest";
import { ErrorNotice } from "@/components/ui/states";
import { useSaveDigestPreference } from "../api/digest-queries";

/** The weekly digest on or off and its weekday; each change is saved at once and said in words. */
export function DigestSettings({ page }: { page: DigestPage }) {
  const save = useSaveDigestPreference();
  const dayId = useId();
  const { enabled, weekday } = save.isPending && save.variables ? save.variables : page.preference;
  const change = (next: Partial<typeof page.preference>) => save.mutate({ enabled, weekday, ...next });
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-x-6 gap-y-3">
        <button
          type="button"
          role="switch"
          aria-checked={enabled}
          disabled={save.isPending}
          onClick={() => change({ enabled: !enabled })}
          className="flex items-center gap-3 text-sm font-semibold disabled:opacity-60"
        >
          <span aria-hidden className={`relative inline-block h-6 w-11 rounded-full transition-colors ${enabled ? "bg-accent" : "bg-line"}`}>
            <span className={`absolute top-0.5 h-5 w-5 rounded-full bg-white shadow transition-all ${enabled ? "left-5" : "left-0.5"}`} />
          </span>
          Weekly digest by e-mail
        </button>
        <div className="flex items-center gap-2">
          <label htmlFor={dayId} className="text-sm font-semibold">Comes on</label>
          <select
            id={dayId}
            value={weekday}
            disabled={save.isPending || !enabled}
            onChange={(e) => change({ weekday: Number(e.target.value) })}
            className="rounded border border-line bg-white px-2 py-1 text-sm disabled:opacity-60"
          >
            {WEEKDAYS.map((d, i) => (
              <option key={d} value={i + 1}>{d}</option>
            ))}
          </select>
        </div>
      </div>
      <p role="status" className="text-sm text-muted">
        {enabled
          ? `On: it goes to ${page.email ?? "your e-mail address (none is known yet: ask an administrator to have it set at your identity provider)"} every ${weekdayName(weekday)} morning, around 06:00 UTC.`
          : "Off: no weekly digest is sent to you. The preview below shows what it would hold."}
        {page.lastSent && ` The last one went in ${page.lastSent.week}.`}
      </p>
      {save.isError && <ErrorNotice error={save.error} />}
    </div>
  );
}
