import { useState, type FormEvent } from "react";
import { useQuery } from "@tanstack/react-query";
import { Card, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { settingsAdminQueries, useSaveSettings } from "@/features/admin/settings/api/settings-admin-queries";
import { useFormat } from "@/lib/use-format";

// awaited: one small answer, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(settingsAdminQueries.current());

const fieldClass = "mt-1 block w-32 rounded border border-line bg-white px-2 py-1 font-mono uppercase";

export function Component() {
  const q = useQuery(settingsAdminQueries.current());
  const save = useSaveSettings();
  const f = useFormat();
  const [draft, setDraft] = useState<string | null>(null);
  if (q.isPending) return <Skeleton />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  const { settings, history } = q.data;
  const value = draft ?? (settings.currencySet ? settings.currency : "");
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save.mutate({ currency: value }, { onSuccess: () => setDraft(null) });
  };

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Group settings</h1>
        <p className="text-muted">Set once for the whole group. Numbers and dates follow each reader's browser language; money is shown in this currency.</p>
      </div>
      <Card title="Currency">
        {!settings.currencySet && (
          <p role="note" className="mb-3 rounded border border-alert px-3 py-2 text-sm">
            No currency is set yet: money is shown in {settings.currency} until an administrator sets the currency the exports' amounts are in. Set it here.
          </p>
        )}
        <form onSubmit={submit} noValidate className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="currency" className="text-sm font-semibold">Currency (ISO 4217 code)</label>
            <input id="currency" value={value} onChange={(e) => setDraft(e.target.value)} maxLength={3} aria-describedby="currency-hint" className={fieldClass} />
          </div>
          <button type="submit" disabled={save.isPending} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-50">
            Save
          </button>
          <p id="currency-hint" className="w-full text-sm text-muted">
            Three letters, such as USD, EUR or GBP: the currency of the parts and labour amounts in the exports. An amount of 1234.5 reads {f.money(1234.5)}.
          </p>
        </form>
        {save.isError && <div className="mt-2"><ErrorNotice error={save.error} /></div>}
        {settings.currencySet && (
          <p className="mt-2 text-sm text-muted">
            Set to {settings.currency} by {settings.currencySetBy} on {f.dateTime(settings.currencySetAt)}.
          </p>
        )}
      </Card>
      {history.length > 0 && (
        <Card title="Changes">
          <ul className="space-y-1 text-sm">
            {history.map((h, i) => (
              <li key={i}>
                <time dateTime={h.at} className="text-muted tabular-nums">{f.dateTime(h.at)}</time> {h.sentence}
              </li>
            ))}
          </ul>
        </Card>
      )}
    </div>
  );
}
