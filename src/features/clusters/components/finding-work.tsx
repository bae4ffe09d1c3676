import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { ErrorNotice } from "@/components/ui/states";
import { findingStatusLabels, findingStatusSchema, type FindingStatus, type FindingWork } from "@shared/schemas/findings";
import { findingQueries, useChangeFinding } from "../api/finding-queries";
import { dateTimeInWords } from "@/features/imports/import-words";

const input = "mt-1 block w-full rounded border border-line bg-white px-2 py-1.5 text-sm aria-[invalid=true]:border-alert";

export const trendWords: Record<FindingWork["state"]["trend"], string> = {
  new: "new",
  stronger: "stronger since the last load",
  weaker: "weaker since the last load",
  unchanged: "unchanged by the last load",
};

/** A finding's status as a small label, with how the last load moved it. */
export function FindingStatusPill({ state }: { state: FindingWork["state"] }) {
  return (
    <span className="inline-flex flex-wrap items-center gap-1 text-xs">
      <span className="rounded-full border border-slate px-2 py-0.5 font-semibold">{findingStatusLabels[state.status]}</span>
      {state.owner && <span className="text-muted">owner {state.owner}</span>}
      {state.trend !== "unchanged" && state.trend !== "new" && <span className="rounded-full bg-accent-soft px-2 py-0.5">{trendWords[state.trend]}</span>}
      {state.grewSinceDismissed && <span className="rounded-full bg-accent-soft px-2 py-0.5">grew since it was dismissed</span>}
    </span>
  );
}

/**
 * Working a finding: its status (new, investigating, confirmed, dismissed with a reason), owner and notes, and the
 * history of who changed what. Offered only to the roles that work findings; the others read the history.
 */
export function FindingWorkPanel({ findingKey }: { findingKey: string }) {
  const q = useQuery(findingQueries.work(findingKey));
  const change = useChangeFinding(findingKey);
  const [status, setStatus] = useState<FindingStatus | "">("");
  const [owner, setOwner] = useState<string | null>(null);
  const [note, setNote] = useState("");
  const [reason, setReason] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  if (q.isPending || q.isError) return null; // not a tracked finding (or not the caller's to read): nothing to work
  const w = q.data;
  const chosen = status || w.state.status;
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    setProblem(null);
    if (chosen === "dismissed" && w.state.status !== "dismissed" && !reason.trim()) {
      setProblem("Say why the finding is dismissed.");
      return;
    }
    const ownerNow = owner === null ? undefined : owner.trim() || null;
    if (chosen === w.state.status && ownerNow === undefined && !note.trim()) {
      setProblem("Change the status or the owner, or write a note.");
      return;
    }
    change.mutate(
      { ...(chosen !== w.state.status ? { status: chosen } : {}), ...(ownerNow !== undefined ? { owner: ownerNow } : {}), ...(note.trim() ? { note: note.trim() } : {}), ...(reason.trim() ? { reason: reason.trim() } : {}) },
      { onSuccess: () => { setNote(""); setReason(""); setStatus(""); setOwner(null); } },
    );
  };
  return (
    <section aria-labelledby="finding-work-title" className="space-y-3 rounded-lg border border-line bg-card p-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="finding-work-title" className="text-lg font-semibold">Working this finding</h2>
        <FindingStatusPill state={w.state} />
      </div>
      {w.state.dismissedReason && <p className="text-sm">Dismissed because: {w.state.dismissedReason}</p>}
      {w.canWork && (
        <form onSubmit={submit} noValidate className="grid gap-3 sm:grid-cols-2" aria-label="Change the finding">
          <div>
            <label htmlFor="finding-status" className="text-sm font-semibold">Status</label>
            <select id="finding-status" value={chosen} onChange={(e) => setStatus(e.target.value as FindingStatus)} className={input}>
              {findingStatusSchema.options.map((s) => <option key={s} value={s}>{findingStatusLabels[s]}</option>)}
            </select>
          </div>
          <div>
            <label htmlFor="finding-owner" className="text-sm font-semibold">Owner</label>
            <input id="finding-owner" value={owner ?? w.state.owner ?? ""} onChange={(e) => setOwner(e.target.value)} autoComplete="off" className={input} />
          </div>
          {chosen === "dismissed" && w.state.status !== "dismissed" && (
            <div className="sm:col-span-2">
              <label htmlFor="finding-reason" className="text-sm font-semibold">Why it is dismissed (required)</label>
              <input id="finding-reason" value={reason} onChange={(e) => setReason(e.target.value)} aria-invalid={!!problem && !reason.trim()} className={input} />
              <p className="mt-1 text-xs text-muted">A dismissed finding leaves the list; it comes back if later loads add failures to it.</p>
            </div>
          )}
          <div className="sm:col-span-2">
            <label htmlFor="finding-note" className="text-sm font-semibold">Note</label>
            <textarea id="finding-note" value={note} onChange={(e) => setNote(e.target.value)} rows={2} className={input} />
          </div>
          {problem && <p role="alert" className="text-sm text-alert sm:col-span-2">{problem}</p>}
          {change.error != null && <div className="sm:col-span-2"><ErrorNotice error={change.error} /></div>}
          <div className="sm:col-span-2">
            <button type="submit" disabled={change.isPending} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-50">
              {change.isPending ? "Saving…" : "Save"}
            </button>
          </div>
        </form>
      )}
      <div>
        <h3 className="text-sm font-semibold">History</h3>
        <ol className="mt-1 space-y-1 text-sm" aria-label="History of the finding">
          {w.events.map((e, i) => (
            <li key={i}>
              <time dateTime={e.at} className="tabular-nums text-muted">{dateTimeInWords(e.at)}</time> · {e.actor}:{" "}
              {e.kind === "found" ? "found by the scan" : e.kind === "status" ? `status ${findingStatusLabels[e.from as FindingStatus] ?? e.from} → ${findingStatusLabels[e.to as FindingStatus] ?? e.to}` : e.kind === "owner" ? `owner ${e.from ?? "none"} → ${e.to ?? "none"}` : e.kind === "figures" ? `figures ${e.from} → ${e.to}` : "note"}
              {e.note && e.kind !== "found" && <span className="text-muted"> — {e.note}</span>}
            </li>
          ))}
        </ol>
      </div>
    </section>
  );
}
