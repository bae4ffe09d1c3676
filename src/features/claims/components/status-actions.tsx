import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions } from "@/features/claims/api/claim-queries";
import type { ClaimDetail, ClaimStatus } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

const actionLabels: Record<ClaimStatus, string> = {
  draft: "Back to draft",
  submitted: "Mark submitted",
  accepted: "Record acceptance",
  partly_accepted: "Record partial acceptance",
  rejected: "Record rejection",
  credited: "Record credit",
  written_off: "Write off",
};

const todayIso = () => new Date().toISOString().slice(0, 10);
/** Calendar days from a to b (ISO dates read as UTC midnight). */
const daysBetween = (a: string, b: string) => Math.round((Date.parse(b) - Date.parse(a)) / 86_400_000);
const field = "mt-1 block w-full rounded border border-line p-2 text-sm";
const plural = (n: number, w: string) => `${n.toLocaleString("en-US")} ${w}${n === 1 ? "" : "s"}`;

/** Submitting: how the claim went out (the packet e-mailed from here, or another way with its reference and date), and a late filing confirmed. */
function SubmitForm({ claim, onDone }: { claim: ClaimDetail; onDone: () => void }) {
  const { move } = useClaimActions(claim.id);
  const sentOn = claim.submitCheck?.sentOn ?? null;
  const [way, setWay] = useState<"mail" | "other">(sentOn ? "mail" : "other");
  const [reference, setReference] = useState("");
  const [filedOn, setFiledOn] = useState(todayIso());
  const [confirmLate, setConfirmLate] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const day = way === "mail" ? sentOn : filedOn;
  const late = day && /^\d{4}-\d{2}-\d{2}$/.test(day) ? Math.max(0, daysBetween(claim.deadline.deadline, day)) : 0;
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    if (way === "other" && !reference.trim()) return setProblem("Give the reference the portal or carrier gave.");
    if (late > 0 && !confirmLate) return setProblem(`Tick the box to confirm filing ${plural(late, "day")} late.`);
    setProblem(null);
    move.mutate({ to: "submitted", confirmLate: late > 0 ? true : undefined, filing: way === "other" ? { reference: reference.trim(), filedOn } : undefined }, { onSuccess: onDone });
  };
  return (
    <form onSubmit={submit} className="space-y-2 rounded border border-line p-3 text-sm" aria-label="Mark submitted">
      <fieldset className="space-y-1">
        <legend className="font-semibold">How did it go to the maker?</legend>
        <label className={`flex items-center gap-2 ${sentOn ? "" : "text-muted"}`}>
          <input type="radio" name="way" checked={way === "mail"} disabled={!sentOn} onChange={() => setWay("mail")} />
          {sentOn ? `The packet e-mailed from here on ${sentOn}` : "E-mailed from here (no packet has gone yet)"}
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="way" checked={way === "other"} onChange={() => setWay("other")} />
          Another way (the maker's portal, a courier): record its reference
        </label>
      </fieldset>
      {way === "other" && (
        <div className="grid gap-2 sm:grid-cols-2">
          <label className="block">
            Reference
            <input value={reference} onChange={(e) => setReference(e.target.value)} className={field} placeholder="as the portal gave it" />
          </label>
          <label className="block">
            Date it went out
            <input type="date" value={filedOn} max={todayIso()} onChange={(e) => setFiledOn(e.target.value)} className={field} />
          </label>
        </div>
      )}
      {late > 0 ? (
        <div role="alert" className="rounded border border-alert/40 bg-alert/10 p-2">
          <p className="font-semibold text-alert">
            Late: filed on {day}, {plural(late, "day")} after the deadline of {claim.deadline.deadline}. The maker may refuse a late claim.
          </p>
          <label className="mt-1 flex items-center gap-2">
            <input type="checkbox" checked={confirmLate} onChange={(e) => setConfirmLate(e.target.checked)} />
            I confirm filing this claim {plural(late, "day")} late
          </label>
        </div>
      ) : (
        day && <p className="text-ok">In time: the deadline is {claim.deadline.deadline}.</p>
      )}
      {problem && <p role="alert" className="text-xs text-alert">{problem}</p>}
      <div className="flex gap-2">
        <button type="submit" disabled={move.isPending} className="rounded bg-accent px-3 py-1.5 font-semibold text-white disabled:opacity-50">Mark submitted</button>
        <button type="button" onClick={onDone} className="rounded border border-line px-3 py-1.5">Cancel</button>
      </div>
      {move.isError && <ErrorNotice error={move.error} />}
    </form>
  );
}

/** The maker's answer (acceptance, partial acceptance, rejection), a credit, or a write-off. */
function AnswerForm({ claim, to, onDone }: { claim: ClaimDetail; to: ClaimStatus; onDone: () => void }) {
  const f = useFormat();
  const { move } = useClaimActions(claim.id);
  const needsAmount = to === "accepted" || to === "partly_accepted" || to === "credited";
  const needsReason = to === "partly_accepted" || to === "rejected" || to === "written_off";
  const start = to === "credited" ? claim.amountPaid : to === "accepted" ? claim.amountClaimed : null;
  const [amount, setAmount] = useState(start === null ? "" : String(start));
  const [reason, setReason] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  const amountLabel = to === "credited" ? "Amount credited" : "Amount the maker pays";
  const reasonLabel = to === "written_off" ? "Why it is not pursued" : to === "partly_accepted" ? "The maker's reason for what it did not pay" : "The maker's reason";
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    const n = Number(amount.replace(/,/g, ""));
    if (needsAmount && (to !== "accepted" || amount.trim()) && !(Number.isFinite(n) && n > 0)) return setProblem(`Enter the ${amountLabel.toLowerCase()}, greater than zero.`);
    if (needsReason && !reason.trim()) return setProblem(`Enter ${reasonLabel.charAt(0).toLowerCase()}${reasonLabel.slice(1)}.`);
    setProblem(null);
    move.mutate({ to, amount: needsAmount && amount.trim() ? n : undefined, reason: needsReason ? reason.trim() : undefined }, { onSuccess: onDone });
  };
  return (
    <form onSubmit={submit} className="space-y-2 rounded border border-line p-3 text-sm" aria-label={actionLabels[to]}>
      {needsAmount && (
        <label className="block">
          {amountLabel}
          {to !== "credited" && <span className="text-muted"> (claimed {f.money(claim.amountClaimed)})</span>}
          <input value={amount} onChange={(e) => setAmount(e.target.value)} inputMode="decimal" className={`${field} max-w-48`} />
        </label>
      )}
      {needsReason && (
        <label className="block">
          {reasonLabel}
          <textarea value={reason} onChange={(e) => setReason(e.target.value)} rows={2} className={field} />
        </label>
      )}
      {problem && <p role="alert" className="text-xs text-alert">{problem}</p>}
      <div className="flex gap-2">
        <button type="submit" disabled={move.isPending} className="rounded bg-accent px-3 py-1.5 font-semibold text-white disabled:opacity-50">Save</button>
        <button type="button" onClick={onDone} className="rounded border border-line px-3 py-1.5">Cancel</button>
      </div>
      {move.isError && <ErrorNotice error={move.error} />}
    </form>
  );
}

/** Correcting a rejected claim as a new version: what was corrected goes into the new version's packet and audit trail. */
function ResubmitForm({ claim, onDone }: { claim: ClaimDetail; onDone: () => void }) {
  const { resubmit } = useClaimActions(claim.id);
  const navigate = useNavigate();
  const [correction, setCorrection] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    if (correction.trim().length < 5) return setProblem("Say what was corrected for the maker (a few words at least).");
    setProblem(null);
    resubmit.mutate({ correction: correction.trim() }, { onSuccess: (c) => navigate(`/claims/${c.id}`) });
  };
  return (
    <form onSubmit={submit} className="space-y-2 rounded border border-line p-3 text-sm" aria-label="Correct and resubmit">
      <p className="text-muted">Makes version {claim.revision + 1} as a draft with the same repair lines; this version stays as it is, readable.</p>
      <label className="block">
        What was corrected
        <textarea value={correction} onChange={(e) => setCorrection(e.target.value)} rows={2} className={field} />
      </label>
      {problem && <p role="alert" className="text-xs text-alert">{problem}</p>}
      <div className="flex gap-2">
        <button type="submit" disabled={resubmit.isPending} className="rounded bg-accent px-3 py-1.5 font-semibold text-white disabled:opacity-50">Make version {claim.revision + 1}</button>
        <button type="button" onClick={onDone} className="rounded border border-line px-3 py-1.5">Cancel</button>
      </div>
      {resubmit.isError && <ErrorNotice error={resubmit.error} />}
    </form>
  );
}

/** The claim's filing and answer as they stand, and the moves it may make next, each with its form. */
export function StatusActions({ claim }: { claim: ClaimDetail }) {
  const fmt = useFormat();
  const [target, setTarget] = useState<ClaimStatus | "resubmit" | null>(null);
  const f = claim.filing;
  return (
    <div className="space-y-2 text-sm">
      {claim.status === "draft" && claim.submitCheck && (
        <p className={claim.submitCheck.daysOverdue > 0 ? "text-alert" : "text-muted"}>
          {claim.submitCheck.daysOverdue > 0 ? `The deadline passed ${plural(claim.submitCheck.daysOverdue, "day")} ago. ` : ""}
          {claim.submitCheck.text}
        </p>
      )}
      {f && (
        <p>
          {f.via === "mail" ? `Went out by e-mail on ${f.filedOn}` : f.via === "other" ? `Went out on ${f.filedOn}, reference ${f.reference}` : "Filed before the way out was recorded"}
          {f.daysLate ? <span className="text-alert"> · {plural(f.daysLate, "day")} late (confirmed)</span> : null}.
        </p>
      )}
      {claim.amountPaid !== null && (
        <p>
          The maker pays <b>{fmt.money(claim.amountPaid)}</b> of {fmt.money(claim.amountClaimed)} claimed
          {claim.amountClaimed !== null && claim.amountPaid < claim.amountClaimed ? ` (${fmt.money(claim.amountClaimed - claim.amountPaid)} not paid)` : ""}.
        </p>
      )}
      {claim.writtenOffReason && <p className="text-muted">Written off: {claim.writtenOffReason}</p>}
      {claim.supersededBy ? (
        <p className="text-muted">Corrected as version {claim.revision + 1}; this version is kept as it was.</p>
      ) : claim.allowedMoves.length === 0 ? (
        <p className="text-muted">This claim is closed: no further status moves.</p>
      ) : (
        <div className="flex flex-wrap gap-2">
          {claim.allowedMoves.map((to) => (
            <button
              key={to}
              type="button"
              onClick={() => setTarget(to)}
              className={`rounded px-3 py-1.5 text-sm font-semibold ${to === "rejected" || to === "written_off" ? "border border-alert text-alert" : "bg-slate text-paper"}`}
            >
              {actionLabels[to]}
            </button>
          ))}
          {claim.canResubmit && (
            <button type="button" onClick={() => setTarget("resubmit")} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white">
              Correct and resubmit
            </button>
          )}
        </div>
      )}
      {target === "submitted" && <SubmitForm claim={claim} onDone={() => setTarget(null)} />}
      {target === "resubmit" && <ResubmitForm claim={claim} onDone={() => setTarget(null)} />}
      {target && target !== "submitted" && target !== "resubmit" && <AnswerForm key={target} claim={claim} to={target} onDone={() => setTarget(null)} />}
    </div>
  );
}
