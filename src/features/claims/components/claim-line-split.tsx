import { useState } from "react";
import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions } from "@/features/claims/api/claim-queries";

import type { ClaimDetail, RepairLineEvidence } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

const lineName = (l: RepairLineEvidence | undefined, id: string) => (l ? `${l.roNumber}/${l.lineNo}` : id);

/** "Include with reason" on a line listed apart: the reason goes into the packet and the audit trail. */
function IncludeForm({ claim, lineId, onDone }: { claim: ClaimDetail; lineId: string; onDone: () => void }) {
  const { include } = useClaimActions(claim.id);
  const [reason, setReason] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <form
      aria-label="Include with reason"
      className="mt-1 space-y-1"
      onSubmit={(e) => {
        e.preventDefault();
        if (reason.trim().length < 5) return setProblem("Give your reason for claiming a line that is not covered (a few words at least).");
        setProblem(null);
        include.mutate({ lineId, include: true, reason: reason.trim() }, { onSuccess: onDone });
      }}
    >
      <textarea value={reason} onChange={(e) => setReason(e.target.value)} rows={2} placeholder="Why the maker should pay for it anyway" className="block w-full rounded border border-line p-2 text-sm" />
      {problem && <p role="alert" className="text-xs text-alert">{problem}</p>}
      <div className="flex gap-2">
        <button type="submit" disabled={include.isPending} className="rounded bg-accent px-2 py-1 text-xs font-semibold text-white disabled:opacity-50">Include in the amount claimed</button>
        <button type="button" onClick={onDone} className="rounded border border-line px-2 py-1 text-xs">Cancel</button>
      </div>
      {include.isError && <ErrorNotice error={include.error} />}
    </form>
  );
}

/** The lines in the amount claimed (covered, or included deliberately with the reason) and the lines listed apart with why. */
export function ClaimLineSplit({ claim }: { claim: ClaimDetail }) {
  const f = useFormat();
  const { include } = useClaimActions(claim.id);
  const [open, setOpen] = useState<string | null>(null);
  const byId = new Map(claim.lines.map((l) => [l.id, l]));
  const s = claim.split;
  const editable = claim.status === "draft";
  const deliberate = s.included.filter((x) => x.basis === "included");
  const covered = s.included.length - deliberate.length;
  return (
    <div className="space-y-3 text-sm">
      <p>
        Claimed: <b>{f.money(claim.amountClaimed)}</b> for {s.included.length} line{s.included.length === 1 ? "" : "s"} ({covered} covered
        {deliberate.length ? `, ${deliberate.length} included deliberately` : ""}).
        {s.apart.length > 0 && <> Listed apart, not claimed: <b>{f.money(s.amountApart)}</b> for {s.apart.length} line{s.apart.length === 1 ? "" : "s"}.</>}
      </p>
      {deliberate.length > 0 && (
        <div>
          <h3 className="font-semibold">Included although not covered</h3>
          <ul className="divide-y divide-line/60" aria-label="Lines included deliberately">
            {deliberate.map((x) => (
              <li key={x.lineId} className="py-1">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span>
                    <b>{lineName(byId.get(x.lineId), x.lineId)}</b> {byId.get(x.lineId)?.machine.serial} · <span className="text-alert">{x.why}</span>
                  </span>
                  <span className="tabular-nums">{f.money(x.amount)}</span>
                </div>
                <p>Reason: {x.reason} <span className="text-muted">({x.includedBy}, {x.includedAt?.slice(0, 10)})</span></p>
                {editable && (
                  <button type="button" disabled={include.isPending} onClick={() => include.mutate({ lineId: x.lineId, include: false })} className="text-xs text-accent underline">
                    Leave it out again
                  </button>
                )}
              </li>
            ))}
          </ul>
        </div>
      )}
      {s.apart.length > 0 && (
        <div>
          <h3 className="font-semibold">Listed apart: not in the amount claimed</h3>
          <ul className="max-h-96 divide-y divide-line/60 overflow-auto" aria-label="Lines listed apart">
            {s.apart.map((x) => {
              const l = byId.get(x.lineId);
              return (
                <li key={x.lineId} className="py-1">
                  <div className="flex flex-wrap items-baseline justify-between gap-2">
                    <span>
                      <b>{lineName(l, x.lineId)}</b> {l?.machine.serial} · {l ? `${f.quantity("hours", l.hourMeter)} h` : ""} · <span className="text-alert">{x.why}</span>
                    </span>
                    <span className="tabular-nums">{f.money(x.amount)}</span>
                  </div>
                  {editable &&
                    (open === x.lineId ? (
                      <IncludeForm claim={claim} lineId={x.lineId} onDone={() => setOpen(null)} />
                    ) : (
                      <button type="button" onClick={() => setOpen(x.lineId)} className="text-xs text-accent underline">Include with reason…</button>
                    ))}
                </li>
              );
            })}
          </ul>
        </div>
      )}
      {include.isError && <ErrorNotice error={include.error} />}
    </div>
  );
}
